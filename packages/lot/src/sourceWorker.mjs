// Worker entry used only when the lot package runs from its TypeScript sources (tests,
// `pnpm motorprint`): Node 20 does not apply `--import` loader flags to worker threads, so this
// plain-JavaScript file loads the TypeScript worker through tsx's import API instead. Compiled
// builds start dist/fitWorker.js directly and never load this file.
import { tsImport } from 'tsx/esm/api';

const worker = await tsImport('./fitWorker.ts', import.meta.url);
export default worker.default;
