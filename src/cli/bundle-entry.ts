// The entry of the command as one file (dist/rungs-cli.mjs, built by scripts/bundle-cli.ts from dist/): hands the
// library this file holds to the study loader, so that study files importing 'rungs' share it (src/study/library.ts),
// then runs the command line. The launcher (bin/rungs.mjs) starts this file when the package has it.
import * as library from '../index.ts';
import { holdLibrary } from '../study/library.ts';

holdLibrary(library);
await import('./main.ts');
