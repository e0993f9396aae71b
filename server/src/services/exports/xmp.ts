import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { ZipArchive } from 'archiver';
import type { Sequelize } from 'sequelize';
import type { Collection } from '../../models/index.ts';
import { itemPages, type ExportItem } from './rows.ts';
import { periodInstants } from './time.ts';

/** Namespaces (IPTC Photo Metadata Standard 2021.1 and later; Dublin Core; RDF; Adobe XMP). */
export const NS = {
  x: 'adobe:ns:meta/',
  rdf: 'http://www.w3.org/1999/02/22-rdf-syntax-ns#',
  dc: 'http://purl.org/dc/elements/1.1/',
  Iptc4xmpCore: 'http://iptc.org/std/Iptc4xmpCore/1.0/xmlns/',
  Iptc4xmpExt: 'http://iptc.org/std/Iptc4xmpExt/2008-02-29/',
} as const;

/** The packet wrapper's id, fixed by the XMP specification (Part 1, §7.3.2). */
export const XPACKET_ID = 'W5M0MpCehiHzreSzNTczkc9d';

/**
 * Text as XML character data or attribute value: the five markup characters as entities, CR as a
 * character reference (a parser would otherwise fold it into LF), and characters XML 1.0 forbids
 * (C0 controls but tab, LF and CR; lone surrogates; U+FFFE/U+FFFF) dropped.
 */
export function xmlEscape(text: string): string {
  return text
    .replace(/[^\t\n\r\u0020-\uD7FF\uE000-\uFFFD\u{10000}-\u{10FFFF}]/gu, '')
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;')
    .replaceAll("'", '&apos;')
    .replaceAll('\r', '&#xD;');
}

/** A Lang Alt: `x-default` first, then the same text under the collection's language (when it has one). */
function langAlt(indent: string, text: string, language: string): string {
  const langs = ['x-default', ...(language && language !== 'x-default' ? [language] : [])];
  const items = langs.map((l) => `${indent}  <rdf:li xml:lang="${xmlEscape(l)}">${xmlEscape(text)}</rdf:li>`).join('\n');
  return `${indent}<rdf:Alt>\n${items}\n${indent}</rdf:Alt>`;
}

/** The controlled vocabulary a concept URI belongs to: the URI up to its last `/` or `#` (its namespace). */
export function vocabularyOf(conceptUri: string): string {
  const cut = Math.max(conceptUri.lastIndexOf('#'), conceptUri.lastIndexOf('/'));
  return cut > conceptUri.indexOf('//') + 1 ? conceptUri.slice(0, cut + 1) : conceptUri;
}

/**
 * A complete XMP sidecar for an approved item (Adobe XMP Specification Part 1 / ISO 16684-1: an
 * `xpacket` processing instruction pair around `x:xmpmeta` › `rdf:RDF` › one `rdf:Description`). It
 * carries the IPTC accessibility fields (`Iptc4xmpCore:AltTextAccessibility`, `ExtDescrAccessibility`,
 * both Lang Alt), the keywords (`dc:subject`, a Bag of the subjects' preferred labels) and each subject
 * with a concept URI as `Iptc4xmpExt:AboutCvTerm` (CvId, CvTermId, CvTermName). A decorative item gets an
 * empty alt text (the null alt of WCAG technique H67); no field is filled from the caption.
 */
export function xmpSidecar(item: ExportItem, opts: { language: string; toolkit: string }): string {
  const lines: string[] = [];
  lines.push(`<?xpacket begin="\uFEFF" id="${XPACKET_ID}"?>`);
  lines.push(`<x:xmpmeta xmlns:x="${NS.x}" x:xmptk="${xmlEscape(opts.toolkit)}">`);
  lines.push(` <rdf:RDF xmlns:rdf="${NS.rdf}">`);
  lines.push(
    `  <rdf:Description rdf:about=""\n    xmlns:dc="${NS.dc}"\n    xmlns:Iptc4xmpCore="${NS.Iptc4xmpCore}"\n    xmlns:Iptc4xmpExt="${NS.Iptc4xmpExt}">`,
  );
  lines.push(`   <dc:identifier>${xmlEscape(item.identifier)}</dc:identifier>`);
  if (item.altText !== null) {
    lines.push('   <Iptc4xmpCore:AltTextAccessibility>', langAlt('    ', item.altText, opts.language), '   </Iptc4xmpCore:AltTextAccessibility>');
  }
  if (item.longDescription) {
    lines.push('   <Iptc4xmpCore:ExtDescrAccessibility>', langAlt('    ', item.longDescription, opts.language), '   </Iptc4xmpCore:ExtDescrAccessibility>');
  }
  if (item.subjects.length > 0) {
    lines.push('   <dc:subject>', '    <rdf:Bag>');
    for (const s of item.subjects) lines.push(`     <rdf:li>${xmlEscape(s.label)}</rdf:li>`);
    lines.push('    </rdf:Bag>', '   </dc:subject>');
  }
  const terms = item.subjects.filter((s) => s.conceptUri);
  if (terms.length > 0) {
    lines.push('   <Iptc4xmpExt:AboutCvTerm>', '    <rdf:Bag>');
    for (const s of terms) {
      const uri = s.conceptUri!;
      lines.push(
        '     <rdf:li rdf:parseType="Resource">',
        `      <Iptc4xmpExt:CvId>${xmlEscape(vocabularyOf(uri))}</Iptc4xmpExt:CvId>`,
        `      <Iptc4xmpExt:CvTermId>${xmlEscape(uri)}</Iptc4xmpExt:CvTermId>`,
        '      <Iptc4xmpExt:CvTermName>',
        langAlt('       ', s.label, opts.language),
        '      </Iptc4xmpExt:CvTermName>',
        '     </rdf:li>',
      );
    }
    lines.push('    </rdf:Bag>', '   </Iptc4xmpExt:AboutCvTerm>');
  }
  lines.push('  </rdf:Description>', ' </rdf:RDF>', '</x:xmpmeta>', '<?xpacket end="w"?>');
  return lines.join('\n') + '\n';
}

/** `plate-0042.tif` → `plate-0042.xmp`: the sidecar takes the image's base name. */
export function sidecarName(fileName: string): string {
  const base = fileName.replace(/^.*[\\/]/, '');
  const dot = base.lastIndexOf('.');
  return `${dot > 0 ? base.slice(0, dot) : base}.xmp`;
}

/**
 * Writes a zip of one `.xmp` sidecar per approved item, named like the item's file. When two items share a
 * file name, the later ones go into a folder named by their identifier (the base name stays the image's).
 * Entries are handed to the archiver a page at a time and the next page waits until they are written, so
 * the archive's queue never holds more than one page. What does grow with the entries is the zip's central
 * directory (one record per entry, written by archiver at finalize(): about 6 KB per entry for a moment, see
 * DEVELOPERS.md and `npm run bench:ledger -- --kinds xmp`).
 */
export async function writeXmpZip(
  sequelize: Sequelize,
  req: { collection: Pick<Collection, 'id' | 'scheduleTimezone' | 'altTextLanguage'>; period: { from: string | null; to: string | null }; filename: string; toolkit: string; onProgress?: (done: number) => Promise<void> | void },
): Promise<{ rows: number }> {
  const out = createWriteStream(req.filename);
  const zip = new ZipArchive({ zlib: { level: 6 } });
  let failure: Error | null = null;
  let appended = 0;
  let written = 0;
  let waiter: { resolve(): void; reject(err: Error): void } | null = null;
  const fail = (err: Error) => {
    failure ??= err;
    waiter?.reject(err);
  };
  zip.on('error', fail);
  zip.on('warning', fail);
  out.on('error', fail);
  zip.on('entry', () => {
    written++;
    if (written >= appended) waiter?.resolve();
  });
  /** resolves once every entry appended so far is in the archive */
  const drained = () =>
    new Promise<void>((resolve, reject) => {
      if (failure) return reject(failure);
      if (written >= appended) return resolve();
      waiter = { resolve, reject };
    }).finally(() => (waiter = null));
  zip.pipe(out);
  const used = new Set<string>();
  let rows = 0;
  for await (const page of itemPages(sequelize, { collectionId: req.collection.id, createdBefore: periodInstants(req.period, req.collection.scheduleTimezone).to, approvedOnly: true })) {
    for (const item of page) {
      let name = sidecarName(item.fileName);
      if (used.has(name)) name = `${item.identifier.replace(/[\\/:*?"<>|]/g, '_')}/${name}`;
      used.add(name);
      zip.append(xmpSidecar(item, { language: req.collection.altTextLanguage, toolkit: req.toolkit }), { name, date: item.approvedAt ?? item.createdAt });
      appended++;
      rows++;
    }
    await drained();
    await req.onProgress?.(rows);
  }
  const closed = once(out, 'close');
  await zip.finalize();
  await closed;
  if (failure) throw failure;
  return { rows };
}
