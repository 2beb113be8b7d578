/** @packageDocumentation */
export {};
