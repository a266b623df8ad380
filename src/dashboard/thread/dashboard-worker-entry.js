// A worker thread does not inherit the main thread's TypeScript loader: register tsx, then load the worker.
import { register } from 'tsx/esm/api';
import { fileURLToPath } from 'node:url';

// The project's own compiler settings (JSX above all), wherever the command is run from: tsx would
// otherwise look for a tsconfig.json in the working folder.
register({ tsconfig: fileURLToPath(new URL('../../../tsconfig.json', import.meta.url)) });
await import('./dashboard-worker.tsx');
