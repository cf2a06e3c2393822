// Loaded with `node --import` before a production process (tests/helpers/processes.ts): registers
// hooks that refuse TypeScript, so a compiled process that still reached a .ts file, or tsx, fails.
import { register } from 'node:module';

register('./hooks.mjs', import.meta.url);
