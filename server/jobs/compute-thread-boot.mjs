// Worker-thread entry: registers tsx's TypeScript loader inside the thread, then loads the
// TypeScript compute module (execArgv loaders are not reliably inherited by worker threads).
import { register } from 'tsx/esm/api';

register();
await import('./compute-thread.ts');
