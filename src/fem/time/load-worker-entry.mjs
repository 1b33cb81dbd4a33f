// Entry of the load worker thread (load-ahead.ts), plain JavaScript since it runs before any TypeScript loader exists
// in the thread: load-worker.ts from a checkout's source (tsx), load-worker.js in the compiled package; started the
// same way as the pool's workers (bin/source-tree.mjs, reached by the same path from src/fem/time/ and dist/fem/time/).
const { importWorkerModule } = await import(new URL('../../../bin/source-tree.mjs', import.meta.url).href);
await importWorkerModule(import.meta.url, 'load-worker', { studies: false });
