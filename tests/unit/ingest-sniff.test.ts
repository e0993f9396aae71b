import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { baseName, cleanIdentifier, identifierFromFileName } from '../../server/src/services/ingest/identifier.ts';
import { cellText, readSheet } from '../../server/src/services/ingest/sheet.ts';
import { extensionNote, sniffFormat } from '../../server/src/services/ingest/sniff.ts';
import { mapColumns, normaliseHeader } from '../../server/src/services/metadata-import.ts';

const bytes = (...b: number[]) => Buffer.from([...b, ...new Array(24).fill(0)]);

describe('telling a scan’s format from its bytes', () => {
  it('knows the four accepted signatures', () => {
    // JPEG: SOI marker FF D8, then the FF of the next marker (ITU-T T.81, Annex B)
    expect(sniffFormat(bytes(0xff, 0xd8, 0xff, 0xe0))).toEqual({ accepted: true, format: 'jpeg' });
    // PNG signature 89 50 4E 47 0D 0A 1A 0A (PNG specification, W3C / ISO/IEC 15948, §5.2)
    expect(sniffFormat(bytes(0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a))).toEqual({ accepted: true, format: 'png' });
    // TIFF header: "II" + 42 little-endian, or "MM" + 42 big-endian (TIFF 6.0, section 2)
    expect(sniffFormat(bytes(0x49, 0x49, 0x2a, 0x00))).toEqual({ accepted: true, format: 'tiff' });
    expect(sniffFormat(bytes(0x4d, 0x4d, 0x00, 0x2a))).toEqual({ accepted: true, format: 'tiff' });
    // WebP: RIFF container with form type "WEBP" (RFC 9649, §2.5)
    expect(sniffFormat(Buffer.concat([Buffer.from('RIFF'), Buffer.from([1, 2, 3, 4]), Buffer.from('WEBPVP8 ')]))).toEqual({ accepted: true, format: 'webp' });
  });

  it('agrees with what sharp writes for each format', async () => {
    const base = () => sharp({ create: { width: 8, height: 8, channels: 3, background: '#335577' } });
    expect(sniffFormat(await base().jpeg().toBuffer())).toMatchObject({ format: 'jpeg' });
    expect(sniffFormat(await base().png().toBuffer())).toMatchObject({ format: 'png' });
    expect(sniffFormat(await base().tiff().toBuffer())).toMatchObject({ format: 'tiff' });
    expect(sniffFormat(await base().webp().toBuffer())).toMatchObject({ format: 'webp' });
  });

  it('names what a refused file is instead', () => {
    expect(sniffFormat(Buffer.from('Kestrelmouth harbour ledger, 1903\n'))).toEqual({ accepted: false, what: 'a text file' });
    expect(sniffFormat(Buffer.from('GIF89a\x01\x00'))).toEqual({ accepted: false, what: 'a GIF image' });
    expect(sniffFormat(Buffer.from('%PDF-1.7\n'))).toEqual({ accepted: false, what: 'a PDF document' });
    expect(sniffFormat(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"/>'))).toEqual({ accepted: false, what: 'an SVG drawing' });
    expect(sniffFormat(Buffer.alloc(0))).toEqual({ accepted: false, what: 'an empty file' });
    // a JPEG signature that stops after two bytes is not a JPEG
    expect(sniffFormat(Buffer.from([0xff, 0xd8]))).toMatchObject({ accepted: false });
  });

  it('notes a misleading extension, and is quiet about a fitting one', () => {
    expect(extensionNote('plate-12.jpg', 'png')).toMatch(/Named \.jpg, but the file is a PNG image/);
    expect(extensionNote('plate-12.JPEG', 'jpeg')).toBeUndefined();
    expect(extensionNote('plate-12', 'tiff')).toBeUndefined();
  });
});

describe('identifiers from file names', () => {
  it('upper-cases the stem and turns other characters into single hyphens', () => {
    expect(identifierFromFileName('kestrel quay 12 (verso).tif')).toBe('KESTREL-QUAY-12-VERSO');
    expect(identifierFromFileName('Écluse_nord.1903.jpg')).toBe('ECLUSE_NORD.1903');
    expect(identifierFromFileName('C:\\scans\\khm-0042.png')).toBe('KHM-0042');
    expect(identifierFromFileName('---.jpg')).toBe('ITEM');
    expect(identifierFromFileName(`${'a'.repeat(300)}.jpg`)).toHaveLength(120);
  });

  it('keeps a catalogue identifier as written, only tidying white space', () => {
    expect(cleanIdentifier('  KHM  1903 / 12 ')).toBe('KHM 1903 / 12');
  });

  it('cuts a path to its last part and drops control characters', () => {
    expect(baseName('folder/sub\\plate\u0007 7.tif')).toBe('plate 7.tif');
    expect(baseName('')).toBe('unnamed');
  });
});

describe('reading catalogue sheets', () => {
  it('matches header names without regard to case, spacing or a Dublin Core prefix', () => {
    expect(normaliseHeader('  File_Name ')).toBe('file name');
    expect(normaliseHeader('dc:Creator')).toBe('creator');
    expect(normaliseHeader('Accession-No.')).toBe('accession no');
  });

  it('reads semicolon CSV in Windows-1252 and keeps spreadsheet row numbers', async () => {
    // "é" is byte E9 in Windows-1252 (and invalid on its own in UTF-8)
    const csv = Buffer.concat([Buffer.from('Identifier;Caption\r\nKHM-1;Caf'), Buffer.from([0xe9]), Buffer.from(' on the quay\r\n;;\r\nKHM-2;Net lofts\r\n\r\n')]);
    const sheet = await readSheet(csv, 'catalogue.csv');
    expect(sheet).toMatchObject({ format: 'csv', encoding: 'windows-1252', delimiter: ';' });
    const { columns, rows } = mapColumns(sheet, 100);
    expect(columns.mapped).toEqual([
      { column: 'Identifier', field: 'identifier' },
      { column: 'Caption', field: 'caption' },
    ]);
    expect(rows).toEqual([
      { row: 2, values: { identifier: 'KHM-1', caption: 'Café on the quay' }, empty: false },
      { row: 3, values: {}, empty: true },
      { row: 4, values: { identifier: 'KHM-2', caption: 'Net lofts' }, empty: false },
    ]);
  });

  it('refuses a sheet that cannot say which item a row is about, or means one field twice', async () => {
    await expect(readSheet(Buffer.from('Caption,Creator\nA pier,Someone\n'), 'x.csv').then((s) => mapColumns(s, 10))).rejects.toThrow(/identifier.*file name/);
    await expect(readSheet(Buffer.from('Identifier,Caption,Title\nK,a,b\n'), 'x.csv').then((s) => mapColumns(s, 10))).rejects.toThrow(/Two columns mean caption/);
    await expect(readSheet(Buffer.from('Identifier,Caption\nK,a\nL,b\nM,c\n'), 'x.csv').then((s) => mapColumns(s, 2))).rejects.toThrow(/3 rows; one import takes up to 2/);
    await expect(readSheet(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0]), 'old.xls')).rejects.toThrow(/older Excel format/);
  });

  it('turns spreadsheet cell values into the text a person sees', () => {
    expect(cellText(new Date(Date.UTC(1903, 4, 1)))).toBe('1903-05-01');
    expect(cellText(1983)).toBe('1983');
    expect(cellText(0.1 + 0.2)).toBe('0.3');
    expect(cellText({ richText: [{ text: 'A ' }, { text: 'pier' }] })).toBe('A pier');
    expect(cellText({ formula: 'A1&B1', result: 'xy' })).toBe('xy');
    expect(cellText({ text: 'plate.jpg', hyperlink: 'http://kestrelmouth-harbour.example/p' })).toBe('plate.jpg');
    expect(cellText(null)).toBe('');
  });
});
