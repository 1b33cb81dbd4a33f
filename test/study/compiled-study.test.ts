import { describe, expect, it } from 'vitest';
import { compiledStudyModule } from '../../src/study/load.ts';

// The compiled package loads a study file that imports only 'rungs' and Node's own modules without tsx's loader
// thread: esbuild compiles its text and 'rungs' is replaced by the URL of the rungs it resolves to
// (src/study/load.ts, importCompiledStudy). Anything more and the file goes through tsx as before.
describe('study files compiled without a loader', () => {
  const RUNGS = 'file:///opt/kiln/node_modules/rungs/dist/index.js';
  const STUDY = `import { defineStudy, interval, lagrange, type StudyDeclaration } from 'rungs';
import { readFileSync } from 'node:fs';
const note: string = 'imported from "rungs" and shaped in a kiln';
const study: StudyDeclaration = defineStudy({ name: 'rod', description: note, domain: interval(0, 1), exact: 'x',
  discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8] }, norms: ['L2'] });
export default study;
export const probe = typeof readFileSync;
`;

  it("compiles the types away and points 'rungs' at the URL, leaving Node's modules and strings alone", async () => {
    const js = await compiledStudyModule(STUDY, '/opt/kiln/studies/rod.study.ts', RUNGS);
    expect(js).not.toBeNull();
    expect(js).toContain(`from ${JSON.stringify(RUNGS)};`);
    expect(js).toContain('from "node:fs";');
    expect(js).toContain(`'imported from "rungs" and shaped in a kiln'`); // a string is not an import
    expect(js).not.toMatch(/StudyDeclaration|: string/);
    expect(js).not.toMatch(/^import[^;]*from "rungs";/m); // no import of the bare name is left
  });

  it.each([
    ['a helper module of its own', `import { g } from './helpers.ts';\nexport default g;`],
    ['another package', `import { mean } from 'simple-statistics';\nexport default mean;`],
    ['import.meta', `export default import.meta.url;`],
    ['a dynamic import', `export default await import('rungs');`],
    ['require', `export default require('rungs');`],
  ])('leaves a study with %s to the loader (null)', async (_what, text) => {
    expect(await compiledStudyModule(text, '/opt/kiln/studies/x.study.ts', RUNGS)).toBeNull();
  });

  it('throws esbuild\'s message, with the file and place, for a file that does not compile', async () => {
    await expect(compiledStudyModule('export default {\n  name: "rod",,\n};\n', '/opt/kiln/studies/bad.study.ts', RUNGS))
      .rejects.toThrow(/bad\.study\.ts:2:\d+: ERROR/);
  });
});
