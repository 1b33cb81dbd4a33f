import { describe, expect, it } from 'vitest';
import { canonicalText, declarationHash, shortHash } from '../../src/gate/declaration-hash.ts';
import { customDomain, defineStudy, interval, lagrange, custom } from '../../src/index.ts';
import type { StudyDeclaration } from '../../src/study/declaration.ts';

// A kiln rod warmed at one end (invented demo data): the declaration the hash is taken of.
const rod = (over: Partial<StudyDeclaration> = {}): StudyDeclaration => defineStudy({
  name: 'kiln-rod',
  description: 'Linear elements on a rod.',
  domain: interval(0, 1),
  exact: 'sin(2*x) + x',
  coefficients: { k: '1 + x' },
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  ...over,
});

describe('canonicalText', () => {
  it('writes objects with sorted keys, dropping undefined entries, whatever the order they were written in', () => {
    expect(canonicalText({ c: 'x', a: 1, b: [true, null, undefined], d: undefined })).toBe('{"a":1,"b":[true,null,null],"c":"x"}');
    expect(canonicalText({ b: { y: 2, x: 1 }, a: -0 })).toBe(canonicalText({ a: -0, b: { x: 1, y: 2 } }));
    expect(canonicalText(new Float64Array([0.5, 2]))).toBe('[0.5,2]');
  });

  it('writes functions by their source text, white space collapsed', () => {
    expect(canonicalText({ f: (x: number) => x * 2 })).toMatch(/^\{"f":fn".*x \* 2.*"\}$/);
    expect(canonicalText((x: number) => x * 2)).not.toBe(canonicalText((x: number) => x * 3));
  });

  it('ends on a cyclic value instead of recursing forever', () => {
    const a: Record<string, unknown> = { n: 1 };
    a.self = a;
    expect(canonicalText(a)).toBe('{"n":1,"self":"[cycle]"}');
  });
});

describe('declarationHash', () => {
  it('is a sha256 in hex, the same for equal declarations built apart', () => {
    expect(declarationHash(rod())).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(declarationHash(rod())).toBe(declarationHash(rod()));
    expect(shortHash(declarationHash(rod()))).toHaveLength(12);
  });

  it('changes with the formulas, ladder, discretization, norms, expected orders and solver', () => {
    const base = declarationHash(rod());
    const variants: Partial<StudyDeclaration>[] = [
      { exact: 'sin(3*x) + x' },
      { coefficients: { k: '2 + x' } },
      { ladder: { n: [8, 16, 64] } },
      { ladder: { n: [8, 16, 32], quick: 2 } },
      { discretization: lagrange({ degree: 2 }) },
      { discretization: lagrange({ degree: 1, quadrature: { load: 1 } }) },
      { norms: ['L2'] },
      { expected: { L2: 2.5 } },
      { tolerance: 0.2 },
      { solver: { method: 'direct' } },
      { domain: interval(0, 2) },
    ];
    const hashes = variants.map((v) => declarationHash(rod(v)));
    for (const h of hashes) expect(h).not.toBe(base);
    expect(new Set(hashes).size).toBe(variants.length);
  });

  it('hashes a custom solve by its source text', () => {
    const solveA = () => { throw new Error('kiln A'); };
    const solveB = () => { throw new Error('kiln B'); };
    const a = declarationHash(rod({ discretization: custom({ label: 'mine', solve: solveA }) }));
    expect(declarationHash(rod({ discretization: custom({ label: 'mine', solve: solveA }) }))).toBe(a);
    expect(declarationHash(rod({ discretization: custom({ label: 'mine', solve: solveB }) }))).not.toBe(a);
  });

  it('leaves out the name, the description and the baseline tolerance', () => {
    const base = declarationHash(rod());
    expect(declarationHash(rod({ name: 'kiln-rod-renamed', description: 'other words', baselineTolerance: 0.2 }))).toBe(base);
  });
});

describe('declarationHash and domains', () => {
  it("ignores a built-in domain's own mesh function but hashes a custom domain's", () => {
    const d = interval(0, 1);
    // The same interval with another mesh function stands for an upgrade of rungs's own code.
    expect(declarationHash(rod({ domain: { ...d, mesh: (n: number) => d.mesh(n + 0) } }))).toBe(declarationHash(rod()));
    const own = (mesh: (n: number) => ReturnType<typeof d.mesh>) => declarationHash(rod({ domain: customDomain({ dim: 1, tags: d.tags, bbox: d.bbox, label: 'rod', mesh }) }));
    expect(own((n) => d.mesh(n))).not.toBe(own((n) => d.mesh(2 * n)));
  });
});
