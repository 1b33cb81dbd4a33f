import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { STUDY_SUFFIX } from '../study/load.ts';

/** Where `rungs init` puts things, relative to the project folder. */
export const INIT_FILES = {
  study: join('studies', `tile-heat${STUDY_SUFFIX}`),
  tsconfig: 'tsconfig.json',
  ci: join('.github', 'workflows', 'rungs-nightly.yml'),
} as const;

/** The baseline the nightly gate compares each level's errors with (recorded once, then committed). */
const BASELINE = 'rungs-baseline.json';

export interface InitFlags {
  quiet?: boolean;
}

/**
 * Scaffolds a project for rungs: a first study to edit, a tsconfig.json when the project has none (so that the
 * editor and `tsc` check study files against rungs's types), and a CI workflow running the gate (`rungs check`)
 * every night. Nothing that exists is overwritten; such files are named and left alone. Exit status 0, or 2 when the
 * folder cannot be written.
 */
export async function initCommand(dir: string, flags: InitFlags): Promise<number> {
  const root = resolve(dir);
  const say = (line: string) => { if (!flags.quiet) console.log(line); };
  const files: [string, string][] = [
    [INIT_FILES.study, studyText()],
    [INIT_FILES.tsconfig, tsconfigText(isEsmPackage(root))],
    [INIT_FILES.ci, nightlyWorkflowText()],
  ];
  for (const [file, text] of files) {
    const path = join(root, file);
    const shown = relative(process.cwd(), path) || path;
    if (existsSync(path)) {
      say(`kept     ${shown} (it exists; nothing written)`);
      continue;
    }
    try {
      mkdirSync(dirname(path), { recursive: true });
      writeFileSync(path, text, { flag: 'wx' });
    } catch (err) {
      console.error(`error: ${shown}: could not be written (${(err as Error).message}); give a folder you can write to`);
      return 2;
    }
    say(`wrote    ${shown}`);
  }
  say('');
  say('Next:');
  say(`  npx rungs run studies                 run the study, reports in reports/`);
  say(`  npx rungs check studies --baseline ${BASELINE} --update-baseline`);
  say(`                                        record the errors of each level once; commit ${BASELINE}`);
  say(`  the workflow ${INIT_FILES.ci.split(/[\\/]/).join('/')} runs the gate every night and keeps the reports`);
  return 0;
}

/** Whether the project's package.json says "type": "module" (its .ts files are then ES modules to TypeScript too). */
function isEsmPackage(root: string): boolean {
  try {
    return (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { type?: unknown }).type === 'module';
  } catch {
    return false;
  }
}

/** A first study in the style of the bundled ones: a manufactured solution on a tile, quadratic elements. */
function studyText(): string {
  return `// A first convergence study. Replace the exact solution, the coefficients, the boundary and the discretization with
// those of your problem; \`npx rungs run studies\` runs it and writes its reports.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-heat',
  description: 'Steady heat in a 2×1 ceramic tile, conductivity varying across it, quadratic triangles.',
  domain: rectangle([0, 2], [0, 1]),
  // The manufactured solution: rungs derives the source term and the boundary data from it.
  exact: 'sin(2*x) * cosh(y) + 0.5*x',
  coefficients: { k: '2 + x*y' },
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
`;
}

/** An ordinary tsconfig for type-checking study files: no settings peculiar to rungs are needed. */
function tsconfigText(esm: boolean): string {
  const module = esm ? { module: 'NodeNext', moduleResolution: 'NodeNext' } : { module: 'ESNext', moduleResolution: 'Bundler' };
  const config = {
    compilerOptions: { target: 'ES2022', ...module, strict: true, noEmit: true, skipLibCheck: true },
    include: ['studies'],
  };
  return `${JSON.stringify(config, null, 2)}\n`;
}

/** GitHub Actions workflow for the nightly gate: `rungs check` fails the job when a study is not as expected or a
 *  level's errors left the baseline; the JUnit file and the reports are kept as an artifact. */
function nightlyWorkflowText(): string {
  return `# Nightly convergence gate, written by \`rungs init\`. \`rungs check\` runs every study, compares the observed orders
# with the expected ones and each level's errors with ${BASELINE}, and exits non-zero when something moved.
# Record the baseline once with: npx rungs check studies --baseline ${BASELINE} --update-baseline
name: rungs nightly
on:
  schedule:
    - cron: '17 2 * * *'
  workflow_dispatch:
jobs:
  convergence:
    runs-on: ubuntu-latest
    steps:
      - uses: actions/checkout@v4
      - uses: actions/setup-node@v4
        with:
          node-version: 20
      - run: npm ci
      - run: npx rungs check studies --baseline ${BASELINE} --junit reports/rungs-junit.xml
      - uses: actions/upload-artifact@v4
        if: always()
        with:
          name: rungs-reports
          path: reports/
`;
}
