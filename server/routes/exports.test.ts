// CSV fields (RFC 4180: standard), checked by reading them back with csv-parse (library).
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { csvField, csvLine } from './exports';

describe('csvLine', () => {
  it('quotes what needs quoting and reads back field for field', () => {
    const fields = ['plain', 'with,comma', 'with "quotes"', 'two\nlines', '', 3.25, -0.001, true, null, undefined, Number.NaN];
    const text = csvLine(fields) + csvLine(['x', 1, 2]);
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = parse(text, { relax_column_count: true }) as string[][];
    expect(rows[0]).toEqual(['plain', 'with,comma', 'with "quotes"', 'two\nlines', '', '3.25', '-0.001', 'true', '', '', '']);
    expect(rows[1]).toEqual(['x', '1', '2']);
  });
  it('leaves safe fields bare', () => {
    expect(csvField('north-south')).toBe('north-south');
    expect(csvField('a"b')).toBe('"a""b"');
    expect(csvField(Infinity)).toBe('');
  });
});
