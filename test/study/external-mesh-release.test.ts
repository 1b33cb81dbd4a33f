import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { afterAll, describe, expect, it } from 'vitest';
import { defineStudy } from '../../src/study/declaration.ts';
import { customDomain, interval } from '../../src/study/domain.ts';
import { external } from '../../src/external/types.ts';
import type { LevelRunner } from '../../src/external/level.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { prepareStudy } from '../../src/study/runner.ts';
import { runLevel } from '../../src/study/level.ts';

// An external code meshes for itself: rungs meshes its level only for h and the cell count, and must not hold that
// mesh while the level waits for the code (as a job of a scheduler, hours, with every level of the ladder waiting at
// once). The domain's mesh is watched through a WeakRef and the garbage collector run while the code "runs".
setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

const root = mkdtempSync(join(tmpdir(), 'rungs-mesh-release-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('an external level waiting for its code', () => {
  it('holds no reference to the mesh rungs made for its h', async () => {
    const rod = interval(0, 1);
    let made: WeakRef<Mesh> | null = null;
    const decl = validateStudy(defineStudy({
      name: 'rod-waiting',
      description: 'A kiln rod (invented data) whose code is slow.',
      domain: customDomain({ dim: 1, tags: ['left', 'right'], bbox: [[0, 1]], label: 'kiln rod', mesh: (n) => {
        const m = rod.mesh(n);
        made = new WeakRef(m);
        return m;
      } }),
      exact: 'sin(x) + x',
      discretization: external({ command: ['unused'], output: 'errors', degree: 1 }),
      ladder: { n: [64, 128] },
      norms: ['L2'],
    }), 'rod-waiting.study.ts');
    const p = prepareStudy({ declaration: decl, file: 'rod-waiting.study.ts' }, { out: join(root, 'out') });
    let heldWhileWaiting: boolean | null = null;
    const folder = join(root, 'job');
    const runner: LevelRunner = {
      folder, prepare: true, move: true,
      run: async () => {
        // A later task than the one that made the mesh (a WeakRef keeps its target alive until its task ends).
        await new Promise((r) => setTimeout(r, 0));
        gc();
        heldWhileWaiting = made!.deref() !== undefined;
        mkdirSync(folder, { recursive: true });
        // No h in the file: the level's h is the one rungs took from its mesh before letting it go.
        writeFileSync(join(folder, 'errors.json'), JSON.stringify({ dofs: 129, errors: { L2: 1e-5 } }));
        return { argv: ['unused'], exitCode: 0, stdout: '', stderr: '', seconds: 0 };
      },
    };
    const level = await runLevel(decl, 'rod-waiting.study.ts', p.problem, 1, p.norms, p.solver, { ...p.env, levelRunner: () => runner });
    expect(heldWhileWaiting).toBe(false);
    // The uniform mesh of [0, 1] with n cells has h = 1/n (common practice, no source).
    expect(level.h).toBe(1 / 128);
  });
});
