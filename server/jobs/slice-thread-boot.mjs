// Worker-thread entry of the slice threads (server/jobs/slice-threads.ts): registers tsx's TypeScript
// loader inside the thread, then loads the TypeScript module (as compute-thread-boot.mjs).
import { register } from 'tsx/esm/api';

register();
await import('./slice-thread.ts');
