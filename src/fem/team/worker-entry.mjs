// Entry of a cell-team worker thread (team.ts), plain JavaScript since it runs before any TypeScript loader exists in
// the thread: worker.ts from a checkout's source (tsx), worker.js in the compiled package (bin/source-tree.mjs, reached
// by the same path from src/fem/team/ and dist/fem/team/).
const { importWorkerModule } = await import(new URL('../../../bin/source-tree.mjs', import.meta.url).href);
await importWorkerModule(import.meta.url, 'worker', { studies: false });
