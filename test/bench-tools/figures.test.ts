// The benchmarks' figure lines and the README block `npm run bench -- --readme` rewrites (test/bench/figures.ts).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { README_BEGIN, README_END, figureTable, parseFigures, printFigure, replaceBetween } from '../bench/figures.ts';

describe('bench figures', () => {
  it('parses the lines printFigure prints, skipping others, and tabulates them', () => {
    const printed: string[] = [];
    const log = console.log;
    console.log = (line: string) => { printed.push(line); };
    try {
      printFigure({ name: 'ladder | whole', value: 4.91234567, unit: 's', target: '≤ 5 s', met: true, note: 'median' });
    } finally { console.log = log; }
    const figures = parseFigures(['noise', ...printed, 'figure: {not json', 'figure: {"name": "no value"}'].join('\n'));
    const table = figureTable(figures.map((figure) => ({ bench: 'peers', figure, load: '1.00 → 1.20' })));
    expect({ figures, row: table[2] }).toEqual({
      figures: [{ name: 'ladder | whole', value: 4.912, unit: 's', target: '≤ 5 s', met: true, note: 'median' }],
      row: '| peers | ladder \\| whole | 4.91 s (median) | ≤ 5 s | met | 1.00 → 1.20 |',
    });
  });

  it('replaces what lies between the markers, and refuses text without them once each, in order', () => {
    const text = `head\n${README_BEGIN}\nold row\n${README_END}\ntail\n`;
    expect({
      replaced: replaceBetween(text, README_BEGIN, README_END, 'heading\n\n| a |'),
      missing: replaceBetween('head\ntail\n', README_BEGIN, README_END, 'x'),
      reversed: replaceBetween(`${README_END}\n${README_BEGIN}\n`, README_BEGIN, README_END, 'x'),
      twice: replaceBetween(text + text, README_BEGIN, README_END, 'x'),
    }).toEqual({ replaced: `head\n${README_BEGIN}\nheading\n\n| a |\n${README_END}\ntail\n`, missing: null, reversed: null, twice: null });
  });

  it('finds the block in README.md, so that --readme can write it', () => {
    const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
    expect(replaceBetween(readme, README_BEGIN, README_END, 'x')).not.toBeNull();
  });
});
