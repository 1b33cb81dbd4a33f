// The library a study file gets for `import ... from 'rungs'` when the command runs as one file (dist/rungs-cli.mjs:
// src/cli/bundle-entry.ts). That file holds its own copy of every module of rungs; a study importing dist/index.js
// instead would load a second copy (about 450 modules, 0.07 s) whose error classes and objects the command would not
// recognise (a RungsInputError from the study's copy is not one of the command's). So the study's 'rungs' is
// answered by a small module that re-exports the held library.

const KEY = Symbol.for('rungs.library');

/** Holds `library` (the namespace of src/index.ts) for the study files of this thread. */
export function holdLibrary(library: Record<string, unknown>): void {
  (globalThis as Record<symbol, unknown>)[KEY] = library;
}

/** The URL of a module exporting the held library's names, or null when no library is held (the command runs as
 *  separate modules: study files import dist/index.js, the same modules as the command's). */
export function heldLibraryUrl(): string | null {
  const library = (globalThis as Record<symbol, unknown>)[KEY] as Record<string, unknown> | undefined;
  if (!library) return null;
  const names = Object.keys(library).filter((n) => /^[A-Za-z_$][\w$]*$/.test(n) && n !== 'default');
  const text = `const library = globalThis[Symbol.for(${JSON.stringify(KEY.description)})];\nexport const { ${names.join(', ')} } = library;\n`;
  return `data:text/javascript;base64,${Buffer.from(text).toString('base64')}`;
}
