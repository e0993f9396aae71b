import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CSV_BOM, csvField, csvRecord } from '../../server/src/services/exports/csv.ts';

describe('CSV records against RFC 4180 §2 and read back with csv-parse (npm)', () => {
  it('writes the RFC’s own examples: plain fields bare, CRLF after each record (§2.1, §2.4)', () => {
    // RFC 4180 §2 rule 1 example: aaa,bbb,ccc CRLF zzz,yyy,xxx CRLF
    expect(csvRecord(['aaa', 'bbb', 'ccc']) + csvRecord(['zzz', 'yyy', 'xxx'])).toBe('aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n');
  });

  it('quotes a field with a line break, a comma or a quote, doubling the quote (§2.6, §2.7)', () => {
    // rule 6 example: "aaa","b CRLF bb","ccc"; rule 7 example: "aaa","b""bb","ccc" (the RFC quotes every field; only the ones that need it are quoted here, which §2.5 allows)
    expect(csvField('b\r\nbb')).toBe('"b\r\nbb"');
    expect(csvField('b"bb')).toBe('"b""bb"');
    expect(csvField('one, two')).toBe('"one, two"');
    expect(csvField('aaa')).toBe('aaa');
    expect(csvField(null)).toBe('');
    expect(csvField(42)).toBe('42');
    expect(csvField(new Date('2026-11-24T10:15:00Z'))).toBe('2026-11-24 10:15');
  });

  it('round-trips awkward text through csv-parse exactly, with the byte-order mark skipped', () => {
    const rows = [
      ['Identifier', 'Alt text', 'Long description'],
      ['KHM-P-0001', 'An engraving of "Old Tom", the lighthouse; waves & spray.', 'Line one,\nline two — café, ß, 灯台'],
      ['KHM-P-0002', '', ''],
      ['KHM-P-0003', '=not a formula, kept as written', ' leading and trailing spaces '],
    ];
    const text = CSV_BOM + rows.map(csvRecord).join('');
    const bytes = Buffer.from(text, 'utf8');
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]); // U+FEFF in UTF-8
    const back = parse(bytes, { bom: true, relax_column_count: false, record_delimiter: '\r\n' }) as string[][];
    expect(back).toEqual(rows);
  });
});
