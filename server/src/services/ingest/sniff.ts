/**
 * Tells an image's real format from its first bytes, never from its name or the browser's MIME type.
 *
 * Accepted: JPEG, PNG, TIFF and WebP. A few other formats people send by mistake are recognised too, so the
 * answer can say what the file is instead of only "not an image".
 */

export const ACCEPTED_FORMATS = ['jpeg', 'png', 'tiff', 'webp'] as const;
export type AcceptedFormat = (typeof ACCEPTED_FORMATS)[number];

export const FORMAT_INFO: Record<AcceptedFormat, { label: string; mimeType: string; extensions: readonly string[] }> = {
  jpeg: { label: 'JPEG', mimeType: 'image/jpeg', extensions: ['jpg', 'jpeg', 'jpe', 'jfif'] },
  png: { label: 'PNG', mimeType: 'image/png', extensions: ['png'] },
  tiff: { label: 'TIFF', mimeType: 'image/tiff', extensions: ['tif', 'tiff'] },
  webp: { label: 'WebP', mimeType: 'image/webp', extensions: ['webp'] },
};

/** How many leading bytes `sniffFormat` looks at. */
export const SNIFF_BYTES = 32;

export type Sniffed = { accepted: true; format: AcceptedFormat } | { accepted: false; what: string };

const startsWith = (head: Buffer, bytes: readonly number[], at = 0): boolean =>
  head.length >= at + bytes.length && bytes.every((b, i) => head[at + i] === b);
const ascii = (head: Buffer, from: number, to: number): string => head.subarray(from, to).toString('latin1');

export function sniffFormat(head: Buffer): Sniffed {
  // JPEG: SOI marker FF D8 followed by the FF of the next marker (ITU-T T.81, Annex B).
  if (startsWith(head, [0xff, 0xd8, 0xff])) return { accepted: true, format: 'jpeg' };
  // PNG: the 8-byte signature 89 50 4E 47 0D 0A 1A 0A (PNG specification, W3C / ISO/IEC 15948, §5.2).
  if (startsWith(head, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return { accepted: true, format: 'png' };
  // TIFF: byte order "II" then 42 little-endian, or "MM" then 42 big-endian (TIFF 6.0, section 2).
  if (startsWith(head, [0x49, 0x49, 0x2a, 0x00]) || startsWith(head, [0x4d, 0x4d, 0x00, 0x2a])) return { accepted: true, format: 'tiff' };
  // WebP: a RIFF container whose form type is "WEBP" (RFC 9649, §2.5).
  if (ascii(head, 0, 4) === 'RIFF' && ascii(head, 8, 12) === 'WEBP') return { accepted: true, format: 'webp' };
  return { accepted: false, what: describeOther(head) };
}

/** Words for a file that is not one of the accepted formats (signatures from memory; only used in messages). */
function describeOther(head: Buffer): string {
  if (head.length === 0) return 'an empty file';
  if (ascii(head, 0, 4) === 'GIF8') return 'a GIF image';
  if (ascii(head, 0, 5) === '%PDF-') return 'a PDF document';
  if (ascii(head, 0, 2) === 'BM') return 'a BMP image';
  if (startsWith(head, [0x49, 0x49, 0x2b, 0x00]) || startsWith(head, [0x4d, 0x4d, 0x00, 0x2b])) return 'a BigTIFF image';
  if (ascii(head, 4, 8) === 'ftyp') {
    const brand = ascii(head, 8, 12);
    if (/^(heic|heix|hevc|mif1|msf1)$/.test(brand)) return 'a HEIF/HEIC image';
    if (/^avi[fs]$/.test(brand)) return 'an AVIF image';
    return 'a video or other media file';
  }
  if (startsWith(head, [0x00, 0x00, 0x00, 0x0c, 0x6a, 0x50, 0x20, 0x20]) || startsWith(head, [0xff, 0x4f, 0xff, 0x51])) return 'a JPEG 2000 image';
  if (startsWith(head, [0x50, 0x4b, 0x03, 0x04])) return 'a ZIP archive (or an office document)';
  if (looksLikeText(head)) {
    const text = head.toString('utf8').trimStart().toLowerCase();
    if (text.startsWith('<svg') || (text.startsWith('<?xml') && text.includes('svg'))) return 'an SVG drawing';
    if (text.startsWith('<')) return 'an HTML or XML file';
    return 'a text file';
  }
  return 'a file of an unknown kind';
}

function looksLikeText(head: Buffer): boolean {
  let printable = 0;
  for (const b of head) if (b === 0x09 || b === 0x0a || b === 0x0d || (b >= 0x20 && b !== 0x7f)) printable++;
  return head.length > 0 && printable === head.length && !head.includes(0);
}

/** The extension of a file name in lower case, without the dot ('' when there is none). */
export function extensionOf(fileName: string): string {
  const m = /\.([A-Za-z0-9]{1,8})$/.exec(fileName);
  return m ? m[1]!.toLowerCase() : '';
}

/** A note when the name promises another format than the bytes hold (the bytes win). */
export function extensionNote(fileName: string, format: AcceptedFormat): string | undefined {
  const ext = extensionOf(fileName);
  if (ext === '' || FORMAT_INFO[format].extensions.includes(ext)) return undefined;
  return `Named .${ext}, but the file is a ${FORMAT_INFO[format].label} image; it was read as ${FORMAT_INFO[format].label}.`;
}
