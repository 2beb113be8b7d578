/**
 * Private test helpers shared by the motorprint packages.
 * @packageDocumentation
 */
export { expectClose } from './expectClose.js';
export { firstDifference } from './firstDifference.js';
