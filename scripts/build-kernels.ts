/** Assembles src/linalg/kernels/sparse.wat into src/linalg/kernels/sparse-wasm.ts (the module's bytes in base64),
 *  so that the library instantiates it synchronously with no assembler at run time. `npm run kernels` runs this;
 *  test/linalg/kernels checks that the committed bytes are those of the committed text. */
import { readFileSync, writeFileSync } from 'node:fs';
import { assembleKernels, kernelModuleText } from './assemble-kernels.ts';

const source = new URL('../src/linalg/kernels/sparse.wat', import.meta.url);
const target = new URL('../src/linalg/kernels/sparse-wasm.ts', import.meta.url);
const bytes = await assembleKernels(readFileSync(source, 'utf8'));
writeFileSync(target, kernelModuleText(bytes));
console.log(`wrote ${target.pathname} (${bytes.length} bytes of WebAssembly)`);
