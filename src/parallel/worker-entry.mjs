// Entry of a pool worker thread, plain JavaScript since it runs before any TypeScript loader exists in the thread:
// worker.ts from a checkout's source (tsx, 'rungs' resolving to src/), worker.js in the compiled package (tsx only for
// study files). See bin/source-tree.mjs; the same path from src/parallel/ and dist/parallel/ reaches it.
const { importWorkerModule } = await import(new URL('../../bin/source-tree.mjs', import.meta.url).href);
const mod = await importWorkerModule(import.meta.url, 'worker');
export default mod.default;
