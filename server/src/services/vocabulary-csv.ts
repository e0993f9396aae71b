import { parse as parseCsv } from 'csv-parse/sync';
import { checkTree, UnreadableVocabulary, type ConceptDraft, type ExportConcept, type VocabularyReading, type Violation } from './skos.ts';

/**
 * A vocabulary as a CSV sheet (RFC 4180: comma-separated, double quotes around fields that need them,
 * quotes doubled inside), one row per subject. Alternative labels share one cell, separated by " | ".
 * The broader column holds the broader subject's URI, or its preferred label for rows without URIs.
 * Cells that a spreadsheet would run as a formula (starting with = + - @) are written with a leading
 * apostrophe, which the reader takes off again (OWASP "CSV Injection" guidance; common practice).
 */

export const CSV_COLUMNS = ['uri', 'prefLabel', 'altLabels', 'broader', 'kind', 'status', 'notation', 'scopeNote', 'altTextPhrase', 'feedsAltText'] as const;
const ALT_SEPARATOR = ' | ';

function cell(value: string): string {
  const guarded = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(guarded) ? `"${guarded.replace(/"/g, '""')}"` : guarded;
}

const unguard = (v: string) => (/^'[=+\-@\t\r]/.test(v) ? v.slice(1) : v);

export function writeCsv(concepts: readonly ExportConcept[]): string {
  const lines = [CSV_COLUMNS.join(',')];
  for (const c of concepts) {
    lines.push(
      [c.uri, c.prefLabel, c.altLabels.join(ALT_SEPARATOR), c.broaderUri ?? '', c.kind, c.status, c.notation ?? '', c.scopeNote ?? '', c.altTextPhrase ?? '', c.feedsAltText ? 'yes' : 'no']
        .map(cell)
        .join(','),
    );
  }
  return `${lines.join('\r\n')}\r\n`;
}

export function readCsv(text: string): VocabularyReading {
  let rows: Array<Record<string, string>>;
  try {
    rows = parseCsv(text.replace(/^\uFEFF/, ''), { columns: (header: string[]) => header.map((h) => h.trim()), skip_empty_lines: true, trim: false, relax_column_count: false });
  } catch (err) {
    throw new UnreadableVocabulary(`Not readable as CSV: ${(err as Error).message}`);
  }
  const violations: Violation[] = [];
  const warnings: string[] = [];
  if (rows.length > 0) {
    const missing = ['prefLabel'].filter((c) => !(c in rows[0]!));
    if (missing.length) throw new UnreadableVocabulary(`The sheet needs a “prefLabel” column; its columns are ${Object.keys(rows[0]!).join(', ')}. Expected: ${CSV_COLUMNS.join(', ')}.`);
    const unknown = Object.keys(rows[0]!).filter((c) => !(CSV_COLUMNS as readonly string[]).includes(c));
    if (unknown.length) warnings.push(`Columns not read: ${unknown.join(', ')}.`);
  }
  const drafts: ConceptDraft[] = rows.map((r, i) => {
    const v = (k: string) => unguard((r[k] ?? '').trim());
    const uri = v('uri') || null;
    const kind = v('kind') || 'subject';
    const status = v('status') || 'draft';
    const feeds = v('feedsAltText').toLowerCase() || 'yes';
    const ref = uri ?? `row ${i + 2}`;
    if (kind !== 'subject' && kind !== 'form') violations.push({ concept: ref, rule: 'Cartouche rule', message: `kind “${kind}” is neither “subject” nor “form”.` });
    if (!['draft', 'active', 'retired'].includes(status)) violations.push({ concept: ref, rule: 'Cartouche rule', message: `status “${status}” is not draft, active or retired.` });
    if (!['yes', 'no', 'true', 'false'].includes(feeds)) violations.push({ concept: ref, rule: 'Cartouche rule', message: `feedsAltText “${feeds}” is not yes or no.` });
    return {
      uri,
      ref,
      prefLabel: v('prefLabel') || null,
      altLabels: v('altLabels') === '' ? [] : v('altLabels').split('|').map((a) => unguard(a.trim())).filter((a) => a !== ''),
      broader: v('broader') || null,
      kind: kind === 'form' ? 'form' : 'subject',
      status: status === 'active' || status === 'retired' ? status : 'draft',
      notation: v('notation') || null,
      scopeNote: v('scopeNote') || null,
      altTextPhrase: v('altTextPhrase') || null,
      feedsAltText: feeds === 'yes' || feeds === 'true',
    };
  });
  // SKOS Reference S13 (§5.4) asks the same of a sheet: a preferred label is not also an alternative one
  for (const d of drafts) {
    if (d.prefLabel !== null && d.altLabels.includes(d.prefLabel)) violations.push({ concept: d.ref, rule: 'SKOS Reference S13', message: `has “${d.prefLabel}” as both its preferred and an alternative label; the label properties are pairwise disjoint (§5.4).` });
  }
  const seenUri = new Map<string, string>();
  for (const d of drafts) {
    if (d.uri === null) continue;
    if (seenUri.has(d.uri)) violations.push({ concept: d.ref, rule: 'Cartouche rule', message: `the URI is on two rows; one row per concept.` });
    seenUri.set(d.uri, d.ref);
  }
  // the broader column names a row by URI first, then by preferred label
  const byRef = new Map(drafts.map((d) => [d.ref, d]));
  const byLabel = new Map(drafts.filter((d) => d.prefLabel).map((d) => [d.prefLabel!.toLocaleLowerCase(), d]));
  const broaderOf = new Map<string, string[]>();
  for (const d of drafts) {
    if (d.broader === null) continue;
    const target = byRef.get(d.broader) ?? byLabel.get(d.broader.toLocaleLowerCase());
    broaderOf.set(d.ref, [target ? target.ref : d.broader]);
    d.broader = target ? target.ref : d.broader;
  }
  checkTree(drafts, broaderOf, violations);
  return { concepts: drafts, violations, warnings };
}
