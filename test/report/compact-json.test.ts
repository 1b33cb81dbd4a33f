import { describe, expect, it } from 'vitest';
import { compactJson } from '../../src/report/compact-json.ts';

describe('compactJson', () => {
  const value = { zeta: [1, 2.5e-7, -3], alpha: { b: 'x"y', a: null }, long: Array.from({ length: 30 }, (_, i) => i * 1.5) };

  it('is JSON that parses back to the same value (ECMA-404 grammar via JSON.parse)', () => {
    expect(JSON.parse(compactJson(value))).toEqual(value);
    expect(JSON.parse(compactJson(value, { sortKeys: true, width: 20 }))).toEqual(value);
  });

  it('keeps short members on one line, breaks long ones, and sorts keys on request', () => {
    const text = compactJson(value, { width: 60, sortKeys: true });
    const lines = text.split('\n');
    expect(lines[1]).toBe('  "alpha": { "a": null, "b": "x\\"y" },');
    expect(lines.filter((l) => l.trim() === '"zeta": [1, 2.5e-7, -3]')).toHaveLength(1);
    expect(lines.every((l) => l.length <= 60)).toBe(true);
    expect(text.indexOf('"alpha"')).toBeLessThan(text.indexOf('"long"'));
    expect(text.indexOf('"long"')).toBeLessThan(text.indexOf('"zeta"'));
  });
});
