// CSV rules of RFC 4180 (Shafranovich 2005, §2): comma separators, CRLF record ends, double-quoted fields holding
// commas, line breaks and doubled quotes.
import { describe, expect, it } from 'vitest';
import { parseCsvRecords, parseCsvTable } from '../../src/csv/read.ts';

const fields = (text: string) => parseCsvRecords(text, 't.csv').map((r) => r.fields);

describe('parseCsvRecords', () => {
  it('splits records on CRLF and LF, keeps empty fields', () => {
    expect(fields('a,b,c\r\n1,,3\n4,5,6')).toEqual([['a', 'b', 'c'], ['1', '', '3'], ['4', '5', '6']]);
  });
  it('reads quoted fields with commas, doubled quotes and line breaks (RFC 4180 §2, rules 5–7)', () => {
    expect(fields('"x, y","say ""hi""","two\r\nlines"\r\nz,"",w\r\n')).toEqual([['x, y', 'say "hi"', 'two\r\nlines'], ['z', '', 'w']]);
  });
  it('drops a byte-order mark and blank lines, and keeps each record\'s first line', () => {
    const recs = parseCsvRecords('\uFEFFh,L2\n\n0.5,"a\nb"\n\n0.25,2\n', 't.csv');
    expect(recs.map((r) => r.fields)).toEqual([['h', 'L2'], ['0.5', 'a\nb'], ['0.25', '2']]);
    expect(recs.map((r) => r.line)).toEqual([1, 3, 6]);
  });
  it('names the line of an unclosed quote and of text after a closing quote', () => {
    expect(() => fields('h,L2\n0.5,"oops\n0.25,1\n')).toThrow('t.csv line 2: a quoted field is never closed');
    expect(() => fields('h,L2\n"0.5"x,1\n')).toThrow("t.csv line 2: unexpected 'x' after a closing quote");
    // The line of the character itself, after a quoted field that spans a CRLF.
    expect(() => fields('h,L2\r\n1,"a\r\nb" x\r\n')).toThrow("t.csv line 3: unexpected 'x' after a closing quote");
  });
  it('refuses a quote inside an unquoted field (RFC 4180 §2, rule 5), naming line and field', () => {
    expect(() => fields('h,L2\n\n0.5,1"5\n')).toThrow(`t.csv line 3: a quote inside the unquoted field 2 ('1"…')`);
  });
  it('reads CRLF, LF and lone CR record ends mixed in one file, counting each as one line', () => {
    // A parser that fixes the record end it meets first would read "1,2\n3,4" below as one record.
    const recs = parseCsvRecords('a,b\r\n1,2\n3,4\r5,"x\r\ny"\r\n6,7\n', 't.csv');
    expect(recs.map((r) => r.fields)).toEqual([['a', 'b'], ['1', '2'], ['3', '4'], ['5', 'x\r\ny'], ['6', '7']]);
    expect(recs.map((r) => r.line)).toEqual([1, 2, 3, 4, 6]);
  });
  it('drops blanks around fields, quoted ones too, and keeps a line holding only "" as a record', () => {
    const recs = parseCsvRecords(' h , "L2" \n  \t \n""\n', 't.csv');
    expect(recs.map((r) => r.fields)).toEqual([['h', 'L2'], ['']]);
    expect(recs.map((r) => r.line)).toEqual([1, 3]);
  });
});

describe('parseCsvTable', () => {
  it('trims header names and checks every row has the header\'s width', () => {
    const t = parseCsvTable(' h , L2 \n0.5,1\n0.25,2\n', 't.csv');
    expect(t.header).toEqual(['h', 'L2']);
    expect(() => parseCsvTable('h,L2\n0.5,1\n0.25\n', 't.csv')).toThrow('t.csv line 3: the row has 1 fields, the header has 2 (h, L2)');
  });
  it('rejects duplicate and empty column names, and an empty file', () => {
    expect(() => parseCsvTable('h,L2,L2\n', 't.csv')).toThrow("t.csv line 1: column name 'L2' appears twice (columns 2 and 3)");
    expect(() => parseCsvTable('h,,L2\n', 't.csv')).toThrow('t.csv line 1: column 2 of the header has no name');
    expect(() => parseCsvTable('\n\n', 't.csv')).toThrow('t.csv line 3: the file is empty');
  });
});

describe('numbers and truncation', () => {
  it('parseDecimal takes plain decimal numbers only (no forms only JavaScript accepts)', async () => {
    const { parseDecimal, parseDigits } = await import('../../src/csv/read.ts');
    expect(['0.125', '-3', '+2.5e-4', '.5', '5.', '1E3'].map(parseDecimal)).toEqual([0.125, -3, 2.5e-4, 0.5, 5, 1000]);
    expect(['0x10', '0b1', '0o7', 'Infinity', '-Infinity', 'NaN', '1_000', '', ' 1', '1e999', '1e', '.', '+-1'].map(parseDecimal))
      .toEqual(new Array(13).fill(null));
    expect(['12', '012', '12.0', '1e1', '+12', '-1'].map(parseDigits)).toEqual([12, 12, null, null, null, null]);
  });
  it('a table must end with a line break: a last row cut inside its last number is refused', () => {
    expect(() => parseCsvTable('h,L2\n0.5,1\n0.25,0.12', 't.csv'))
      .toThrow('t.csv line 3: the file does not end with a line break, so its last record (line 3) may be cut off');
    expect(parseCsvTable('h,L2\r\n0.5,1\r\n', 't.csv').rows).toHaveLength(1);
    expect(parseCsvTable('h,L2\n0.5,1', 't.csv', { finalLineBreak: false }).rows).toHaveLength(1);
  });
});
