/**
 * CSV, terminal, Markdown and LaTeX reports of studies with time (time-fixture.ts): the steps and Δt columns, the
 * sentence that says what the ladder refines, and the joint fit of a two-axis design. Expected values are worked out
 * here by hand from the fixtures' declarations (T, steps, n), never taken from an earlier run.
 */
import { describe, expect, it } from 'vitest';
import { levelsCsv, summaryCsv, SUMMARY_COLUMNS, SUMMARY_TIME_COLUMNS } from '../../src/report/csv.ts';
import { resultJson } from '../../src/report/json.ts';
import { latexTable, markdownTable } from '../../src/report/tables.ts';
import { formatStudyTable } from '../../src/report/terminal.ts';
import { csvRecords, parseCsv } from './csv-parse.ts';
import { tileP2 } from './fixture.ts';
import { GRID_FITS, rodCoupled, rodDt, rodGrid, rodGridFlawed, rodH } from './time-fixture.ts';

// Δt = T/steps for equal steps over [0, T] (common practice, no source), written out by hand:
// rod-be-dt: T = 2, steps 8 … 128.
const DT_STEPS = [8, 16, 32, 64, 128];
const DT_VALUES = [0.25, 0.125, 0.0625, 0.03125, 0.015625];
// The same Δt in three significant digits (1.25e-01 style); 0.03125 rounds half up to 3.13 (ECMA-262 toExponential
// picks the larger of two equally near candidates).
const DT_SCI = ['2.50e-01', '1.25e-01', '6.25e-02', '3.13e-02', '1.56e-02'];

describe('levelsCsv of a study with time', () => {
  it('puts steps and dt right after h, with Δt = T/steps', () => {
    const { header, records } = csvRecords(levelsCsv(rodDt()));
    expect(header.slice(0, 7)).toEqual(['level', 'n', 'h', 'steps', 'dt', 'dofs', 'cells']);
    expect(records.map((r) => r.steps)).toEqual(DT_STEPS.map(String));
    // Written as JavaScript prints the double (shortest round trip, ECMA-262 Number::toString).
    expect(records.map((r) => r.dt)).toEqual(['0.25', '0.125', '0.0625', '0.03125', '0.015625']);
    expect(records.map((r) => Number(r.dt))).toEqual(DT_VALUES);
    // The fixed mesh: n = 64, h = 1/64 = 0.015625 on every level.
    expect(new Set(records.map((r) => r.h))).toEqual(new Set(['0.015625']));
    for (const row of parseCsv(levelsCsv(rodDt())).slice(1)) expect(row).toHaveLength(header.length);
  });

  it('gives the rate in Δt, ln(e1/e2)/ln(Δt1/Δt2), which is log2 of the error ratio when Δt halves', () => {
    // Observed order between two levels (Roache 1998, Verification and Validation in Computational Science and
    // Engineering; from memory), with Δt in place of h on a ladder in Δt.
    const { records } = csvRecords(levelsCsv(rodDt()));
    expect(records[0].L2_rate).toBe('');
    for (let i = 1; i < records.length; i++) {
      expect(Number(records[i].L2_rate)).toBeCloseTo(Math.log2(Number(records[i - 1].L2_error) / Number(records[i].L2_error)), 12);
    }
  });

  it('lists every (n, steps) pair of a two-axis design, n slowest, with h = 1/n and Δt = 1/steps', () => {
    const { records } = csvRecords(levelsCsv(rodGrid()));
    expect(records).toHaveLength(16);
    const pairs = records.map((r) => [Number(r.n), Number(r.steps), Number(r.h), Number(r.dt)]);
    const expected: number[][] = [];
    for (const n of [4, 8, 16, 32]) for (const s of [4, 8, 16, 32]) expected.push([n, s, 1 / n, 1 / s]);
    expect(pairs).toEqual(expected);
    // The fixture's errors are 0.4 h^3 + 0.2 Δt (its own definition): level 6 is n = 8, 8 steps.
    expect(Number(records[5].L2_error)).toBeCloseTo(0.4 / 512 + 0.2 / 8, 15);
  });

  it('on a coupled path Δt = 0.5·h takes 2n steps over T = 1', () => {
    const { records } = csvRecords(levelsCsv(rodCoupled()));
    // steps = T/Δt = 1/(0.5/n) = 2n (worked by hand).
    expect(records.map((r) => [r.n, r.steps, r.dt])).toEqual([
      ['4', '8', '0.125'], ['8', '16', '0.0625'], ['16', '32', '0.03125'], ['32', '64', '0.015625'], ['64', '128', '0.0078125'],
    ]);
  });
});

describe('summaryCsv with studies with time', () => {
  const steadyOnly = csvRecords(summaryCsv([tileP2()]));
  const mixed = csvRecords(summaryCsv([tileP2(), rodDt(), rodGrid(), rodGridFlawed()]));

  it('adds the time columns only when a study has time', () => {
    expect(steadyOnly.header).toEqual([...SUMMARY_COLUMNS]);
    expect(mixed.header).toEqual([...SUMMARY_COLUMNS, ...SUMMARY_TIME_COLUMNS]);
    // A steady study's row keeps its cells and leaves the new ones empty.
    const tile = mixed.records.filter((r) => r.study === 'tile-p2');
    tile.forEach((r, i) => {
      for (const c of SUMMARY_COLUMNS) expect(r[c]).toBe(steadyOnly.records[i][c]);
      for (const c of SUMMARY_TIME_COLUMNS) expect(r[c]).toBe('');
    });
  });

  it('names the axis and, for a two-axis design, both orders with intervals and verdicts', () => {
    expect(mixed.records.find((r) => r.study === 'rod-be-dt')!.axis).toBe('dt');
    const row = mixed.records.find((r) => r.study === 'rod-cn-grid-slow' && r.norm === 'L2')!;
    const f = GRID_FITS.L2;
    expect([row.axis, row.space_expected, row.space_order, row.space_ci_low, row.space_ci_high, row.space_verdict]).toEqual(
      ['grid', '3', String(f.p), String(f.pInterval[0]), String(f.pInterval[1]), 'on-order']);
    expect([row.time_expected, row.time_order, row.time_ci_low, row.time_ci_high, row.time_verdict]).toEqual(
      ['2', String(f.q), String(f.qInterval[0]), String(f.qInterval[1]), 'below-order']);
    expect(row.as_expected).toBe('false');
    expect(row.reasons).toContain('is below the expected 2');
  });
});

/** The level rows of a terminal table: lines that start with a level number and an h value. */
function terminalRows(text: string): string[][] {
  return text.split('\n').filter((l) => /^\s+\d+\s+\d\.\d\de[+-]\d\d/.test(l)).map((l) => l.trim().split(/\s+/));
}

describe('terminal table of a study with time', () => {
  it('says what a ladder in Δt does and shows steps and Δt after h', () => {
    const text = formatStudyTable(rodDt(), { color: false });
    expect(text).toContain('time: T = 2, backward Euler (temporal order 1); Δt refined on a fixed mesh (n = 64), fitted against Δt: the temporal order');
    expect(text).toMatch(/level +h +steps +Δt +dofs +L2 error +rate +H1semi error +rate/);
    const rows = terminalRows(text);
    expect(rows.map((r) => r[2])).toEqual(DT_STEPS.map(String));
    expect(rows.map((r) => r[3])).toEqual(DT_SCI);
    expect(text).toMatch(/L2 +fitted \d\.\d\d ± [\d.]+, 95% CI \[\d\.\d\d, \d\.\d\d\] in Δt, levels 3–5; expected 1/);
  });

  it('says at which Δt the mesh is refined, and the coupled path', () => {
    // 1/1024 = 9.765625e-4 → 9.77e-04.
    const h = formatStudyTable(rodH(), { color: false });
    expect(h).toContain('time: T = 1, BDF2 (temporal order 2); mesh refined at Δt = 1/1024, fitted against h: the spatial order');
    expect(terminalRows(h).map((r) => r[3])).toEqual(['9.77e-04', '9.77e-04', '9.77e-04', '9.77e-04']);
    const c = formatStudyTable(rodCoupled(), { color: false });
    expect(c).toContain('time: T = 1, Crank–Nicolson (temporal order 2); coupled path Δt = 0.5·h^1 (steps rounded up so that they divide T), one fit against h');
  });

  it('gives a two-axis design its design sentence, no rate columns, and the joint fit of each norm', () => {
    const text = formatStudyTable(rodGrid(), { color: false });
    expect(text).toContain('two-axis design of 16 (h, Δt) pairs (4 meshes × 4 step counts), fitted jointly as e = C_h·h^p + C_t·Δt^q');
    const rows = terminalRows(text);
    expect(rows).toHaveLength(16);
    // level, h, steps, Δt, dofs, L2 error, H1semi error: a rate between two pairs of the design measures no one order.
    for (const r of rows) expect(r).toHaveLength(7);
    expect(text).toContain('L2      joint fit p = 2.98 [2.91, 3.05] (expected 3) ✓ on-order; q = 1.01 [0.98, 1.04] (expected 1) ✓ on-order');
    expect(text).toContain('C_h = 3.90e-01, C_t = 2.05e-01, residual σ = 1.10e-02 over 16 points (12 dof)');
  });

  it('puts both verdicts of a two-axis norm in the summary and marks the failing one', () => {
    const text = formatStudyTable([rodGrid(), rodGridFlawed()], { color: false });
    expect(text).toContain('✓ rod-be-grid       L2 (h ✓ on-order, Δt ✓ on-order), H1semi (h ✓ on-order, Δt ✓ on-order)');
    expect(text).toContain('✗ rod-cn-grid-slow  L2 (h ✓ on-order, Δt ✗ below-order) (expected on-order)');
    const colored = formatStudyTable([rodGrid(), rodGridFlawed()], { color: true });
    // Colour only doubles the text (ECMA-48 SGR sequences stripped leave the plain text).
    expect(colored.replace(/\u001b\[[0-9;]*m/g, '')).toBe(text);
  });
});

function markdownRows(md: string): string[][] {
  return md.split('\n').filter((l) => l.startsWith('|')).map((l) => l.slice(1, -1).split(/(?<!\\)\|/).map((c) => c.trim()));
}

describe('Markdown of a study with time', () => {
  it('has the ladder sentence and steps and Δt columns', () => {
    const md = markdownTable(rodDt());
    expect(md.split('\n')[2]).toBe('time: T = 2, backward Euler (temporal order 1); Δt refined on a fixed mesh (n = 64), fitted against Δt: the temporal order');
    const rows = markdownRows(md);
    expect(rows[0]).toEqual(['level', 'h', 'steps', 'Δt', 'dofs', 'L2 error', 'L2 rate', 'H1semi error', 'H1semi rate']);
    expect(rows.slice(2).map((r) => [r[2], r[3]])).toEqual(DT_STEPS.map((s, i) => [String(s), DT_SCI[i]]));
    expect(md).toMatch(/L2 fitted \d\.\d\d \[\d\.\d\d, \d\.\d\d\] in Δt over levels 3–5, expected 1: ✓ on-order/);
  });

  it('gives a two-axis design one error column per norm and the joint fit with both verdicts', () => {
    const md = markdownTable(rodGridFlawed());
    const rows = markdownRows(md);
    expect(rows[0]).toEqual(['level', 'h', 'steps', 'Δt', 'dofs', 'L2 error', 'H1semi error']);
    for (const r of rows) expect(r).toHaveLength(7);
    expect(md).toContain('L2 joint fit p = 2.98 [2.91, 3.05], expected 3: ✓ on-order; q = 1.01 [0.98, 1.04], expected 2: ✗ below-order (expected on-order)');
  });
});

describe('LaTeX of a study with time', () => {
  /** Math spans must pair up, and no two may touch ("$$" would start display math). */
  function checkMath(text: string) {
    expect((text.match(/(?<!\\)\$/g) ?? []).length % 2).toBe(0);
    expect(text).not.toContain('$$');
  }

  it('has steps and $\\Delta t$ columns after $h$ and moves the norm rules two columns right', () => {
    const tex = latexTable(rodDt());
    expect(tex).toContain('\\begin{tabular}{rrrrrrrrr}');
    expect(tex).toContain('level & $h$ & steps & $\\Delta t$ & dofs & error & rate & error & rate \\\\');
    expect(tex).toContain('\\cmidrule(lr){6-7} \\cmidrule(lr){8-9}');
    expect(tex).toContain('    & & & & & \\multicolumn{2}{c}{L2} & \\multicolumn{2}{c}{H1semi} \\\\');
    // Level 1: 8 steps, Δt = 2/8 = 2.50e-01.
    expect(tex).toMatch(/\n    1 & \$1\.56\\times10\^\{-2\}\$ & 8 & \$2\.50\\times10\^\{-1\}\$ & 129 & /);
    expect(tex).toContain('$\\Delta t$ refined on a fixed mesh (n = 64), fitted against $\\Delta t$: the temporal order');
    checkMath(tex.split('\n').find((l) => l.includes('\\caption'))!);
  });

  it('writes the coupled path and the two-axis model as single math spans', () => {
    const c = latexTable(rodCoupled());
    expect(c).toContain('coupled path $\\Delta t = 0.5\\cdot h^{1}$');
    const g = latexTable(rodGrid());
    expect(g).toContain('two-axis design of 16 $(h, \\Delta t)$ pairs (4 meshes $\\times$ 4 step counts), fitted jointly as $e = C_h h^p + C_t \\Delta t^q$');
    expect(g).toContain('\\begin{tabular}{rrrrrrr}');
    expect(g).toContain('level & $h$ & steps & $\\Delta t$ & dofs & error & error \\\\');
    expect(g).not.toContain('\\cmidrule');
    for (const tex of [c, g]) checkMath(tex.split('\n').find((l) => l.includes('\\caption'))!);
  });
});

describe('JSON of a study with time', () => {
  it('keeps the time declaration, steps and Δt per level and the joint fits', () => {
    const json = JSON.parse(resultJson(rodGrid()));
    expect(json.time).toEqual({ final: 1, stepper: 'backward-euler', axis: 'grid', order: 1 });
    // Level 6 is n = 8 with 8 steps: Δt = 1/8.
    expect([json.levels[5].n, json.levels[5].steps, json.levels[5].dt]).toEqual([8, 8, 0.125]);
    expect(json.twoAxis[0].fit.pInterval).toEqual([2.91, 3.05]);
  });

  it('writes an unbounded interval of a joint fit as null and says where', () => {
    // JSON has no Infinity (RFC 8259 §6).
    const r = rodGrid();
    r.twoAxis![0].fit = { ...r.twoAxis![0].fit!, qInterval: [-Infinity, Infinity], dof: 0 };
    const json = JSON.parse(resultJson(r));
    expect(json.twoAxis[0].fit.qInterval).toEqual([null, null]);
    expect(json.nonFiniteValues['twoAxis[0].fit.qInterval[1]']).toBe('Infinity');
  });
});
