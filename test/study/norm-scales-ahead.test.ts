import { describe, expect, it } from 'vitest';
import { defineStudy, lagrange } from '../../src/study/declaration.ts';
import { rectangle } from '../../src/study/domain.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { prepareStudy } from '../../src/study/runner.ts';
import { normScales, normScalesAhead } from '../../src/study/discretizations/norm-scales.ts';
import { cellTeam, setTeamThreads } from '../../src/fem/team/team.ts';
import { useWorkerTeam } from '../fem/team/helpers.ts';

// The exact solution's own norms on the first level's mesh (the round-off scales) measured on the cell team's worker
// while the finest level runs (src/study/discretizations/norm-scales.ts, normScalesAhead): the same numbers, bit for
// bit, as this thread's, and really computed there.
describe('norm scales measured ahead on the cell team', () => {
  useWorkerTeam();

  const study = (degree: number) => validateStudy(defineStudy({
    name: `tile-scales-p${degree}`, domain: rectangle([0, 2], [0, 1]), exact: 'sin(pi*x) * exp(-y) + x*y*y',
    discretization: lagrange({ degree }), ladder: { n: [6, 12, 24] }, norms: ['L2', 'H1semi', 'H1'],
  }), 'tile-scales.study.ts');

  it.each([1, 2])('P%i: the worker\'s scales are this thread\'s', (degree) => {
    const decl = study(degree);
    const p = prepareStudy({ declaration: decl, file: 'tile-scales.study.ts' });
    const here = normScales(decl, p.problem);
    const done = cellTeam().partsElsewhere;
    const ahead = normScalesAhead(decl, p.problem);
    expect(ahead).not.toBeNull();
    const there = normScales(decl, p.problem, ahead);
    expect(cellTeam().partsElsewhere - done).toBe(1); // the worker measured them
    expect(here.L2).toBeGreaterThan(0);
    expect(Object.entries(there).map(([k, v]) => [k, Object.is(v, here[k])])).toEqual(Object.keys(here).map((k) => [k, true]));
    expect(Object.keys(there).sort()).toEqual(Object.keys(here).sort());
  });

  it('with one thread nothing is started', () => {
    setTeamThreads(1);
    try {
      const decl = study(1);
      expect(normScalesAhead(decl, prepareStudy({ declaration: decl, file: 'tile-scales.study.ts' }).problem)).toBeNull();
    } finally { setTeamThreads(2); }
  });
});
