// Starts a worker from the TypeScript sources (tsx, tests): registers tsx's loader in this
// thread, then runs the worker. The desktop bundle uses app/shell/dist/worker.cjs instead.
import { register } from 'tsx/esm/api';

register();
await import('./worker.ts');
