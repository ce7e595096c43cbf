// Worker-thread entry of the document threads (server/jobs/thread-pool.ts): registers tsx's
// TypeScript loader inside the thread, then loads the TypeScript module (as compute-thread-boot.mjs).
import { register } from 'tsx/esm/api';

register();
await import('./document-thread.ts');
