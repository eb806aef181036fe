// Moved into config/environment.ts (the one reader of process.env); re-exported for the modules
// that still import it from here.
export { readSecrets, secretNames, type Secrets } from './environment.js';
