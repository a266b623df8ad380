// A worker thread does not inherit the main thread's TypeScript loader: register tsx, then load the worker.
import { register } from 'tsx/esm/api';

register();
await import('./dashboard-worker.tsx');
