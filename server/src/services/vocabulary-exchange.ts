import type { Sequelize } from 'sequelize';
import { subjectCreateSchema } from '../../../common/schemas/subject.ts';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Subject } from '../models/index.ts';
import { readTurtle, UnreadableVocabulary, writeTurtle, type ExportConcept, type VocabularyReading, type Violation } from './skos.ts';
import { readCsv, writeCsv } from './vocabulary-csv.ts';
import { audit } from './audit.ts';
import type { Actor } from './review.ts';
import { conceptUriOf } from './vocabulary.ts';

export type ExchangeFormat = 'turtle' | 'csv';

/** Every subject of the collection with its cited URI, parents before children, then by label. */
async function exportConcepts(c: Collection, base: string): Promise<ExportConcept[]> {
  const subjects = await Subject.findAll({ where: { collectionId: c.id }, order: [['prefLabel', 'ASC']] });
  const uriOf = new Map(subjects.map((s) => [s.id, conceptUriOf(s, c.slug, base)]));
  const children = new Map<number | null, Subject[]>();
  for (const s of subjects) children.set(s.broaderId, [...(children.get(s.broaderId) ?? []), s]);
  const ordered: Subject[] = [];
  const walk = (parent: number | null) => {
    for (const s of children.get(parent) ?? []) {
      ordered.push(s);
      walk(s.id);
    }
  };
  walk(null);
  return ordered.map((s) => ({
    uri: uriOf.get(s.id)!,
    prefLabel: s.prefLabel,
    altLabels: s.altLabels,
    broaderUri: s.broaderId === null ? null : (uriOf.get(s.broaderId) ?? null),
    narrowerUris: (children.get(s.id) ?? []).map((n) => uriOf.get(n.id)!),
    kind: s.kind,
    status: s.status,
    notation: s.notation,
    scopeNote: s.scopeNote,
    altTextPhrase: s.altTextPhrase,
    feedsAltText: s.feedsAltText,
  }));
}

export function schemeUri(c: Collection, base: string): string {
  return `${base}${c.slug}`;
}

export async function exportVocabulary(c: Collection, format: ExchangeFormat, base: string): Promise<string> {
  const concepts = await exportConcepts(c, base);
  if (format === 'csv') return writeCsv(concepts);
  return writeTurtle({ uri: schemeUri(c, base), title: c.name, description: c.description, language: c.altTextLanguage }, concepts);
}

export interface ImportReport {
  dryRun: boolean;
  concepts: number;
  created: number;
  updated: number;
  /** subjects already in the collection that the file does not mention: left as they are */
  untouched: number;
  warnings: string[];
}

class DryRunDone extends Error {
  constructor(readonly report: ImportReport) {
    super('dry run');
  }
}

function refuse(violations: Violation[]): HttpProblem {
  const concepts = new Set(violations.map((v) => v.concept)).size;
  return new HttpProblem(
    422,
    'Vocabulary not imported',
    `The file breaks ${violations.length} ${violations.length === 1 ? 'rule' : 'rules'} in ${concepts} ${concepts === 1 ? 'concept' : 'concepts'}; nothing was imported. Correct the file and import it again.`,
    { type: '/problems/vocabulary-integrity', errors: violations.map((v) => ({ path: v.concept, message: `${v.rule}: ${v.message}` })) },
  );
}

/**
 * Imports a vocabulary file into a collection, whole or not at all. A concept whose URI a subject of the
 * collection already has updates that subject; any other concept becomes a new subject (keeping its URI,
 * or minting one under `base` for a CSV row without). Subjects the file does not mention are kept as they
 * are. Any integrity violation, or a preferred label another subject already has, refuses the whole file.
 * `dryRun` checks everything, database constraints included, and stores nothing. A stored import writes one
 * `vocabulary-imported` audit event with its counts in the same transaction; a refused one or a dry run writes none.
 */
export async function importVocabulary(sequelize: Sequelize, collectionId: number, format: ExchangeFormat, text: string, base: string, actor: Actor, dryRun = false): Promise<ImportReport> {
  const c = await Collection.findByPk(collectionId);
  if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
  if (c.archivedAt) throw new HttpProblem(409, 'Collection archived', `${c.name} is archived; restore it before importing into it.`);
  let reading: VocabularyReading;
  try {
    reading = format === 'csv' ? readCsv(text) : readTurtle(text, c.altTextLanguage);
  } catch (err) {
    if (err instanceof UnreadableVocabulary) throw new HttpProblem(400, 'Unreadable file', err.message);
    throw err;
  }
  const violations = [...reading.violations];
  if (reading.concepts.length === 0) throw new HttpProblem(422, 'Vocabulary not imported', format === 'csv' ? 'The sheet has no rows.' : 'The file has no skos:Concept.');
  // each concept must also make a valid subject (the same schema as the subject form)
  for (const d of reading.concepts) {
    const r = subjectCreateSchema.safeParse({ prefLabel: d.prefLabel ?? '', altLabels: d.altLabels, kind: d.kind, broaderId: null, notation: d.notation ?? '', scopeNote: d.scopeNote ?? '', altTextPhrase: d.altTextPhrase ?? '', status: d.status, feedsAltText: d.feedsAltText, conceptUri: d.uri ?? '' });
    if (r.success || d.prefLabel === null) continue;
    // a label clash already reported under S13 is not reported twice
    const s13 = violations.some((v) => v.concept === d.ref && v.rule === 'SKOS Reference S13');
    for (const issue of r.error.issues) {
      if (s13 && issue.path[0] === 'altLabels' && issue.code === 'custom') continue;
      violations.push({ concept: d.ref, rule: 'Cartouche rule', message: `${issue.path.join('.') || 'concept'}: ${issue.message}` });
    }
  }

  try {
    return await sequelize.transaction(async (transaction) => {
      const existing = await Subject.findAll({ where: { collectionId }, transaction, lock: transaction.LOCK.UPDATE });
      const byUri = new Map(existing.map((s) => [conceptUriOf(s, c.slug, base), s]));
      const byLabel = new Map(existing.map((s) => [s.prefLabel.trim().toLocaleLowerCase(), s]));
      for (const d of reading.concepts) {
        if (d.prefLabel === null) continue;
        const holder = byLabel.get(d.prefLabel.trim().toLocaleLowerCase());
        const same = d.uri !== null && byUri.get(d.uri) === holder;
        if (holder && !same) violations.push({ concept: d.ref, rule: 'Cartouche rule', message: `the preferred label “${d.prefLabel}” is already used by the subject ${conceptUriOf(holder, c.slug, base)} of this collection.` });
      }
      if (violations.length) throw refuse(violations);

      const saved = new Map<string, Subject>();
      const matched = new Set<Subject>();
      const before = new Map<Subject, string>();
      const snapshot = (s: Subject) => JSON.stringify([s.prefLabel, s.altLabels, s.kind, s.status, s.notation, s.scopeNote, s.altTextPhrase, s.feedsAltText, s.broaderId, s.conceptUri]);
      // first the records, then the tree (broader links need every id)
      for (const d of reading.concepts) {
        const fields = { prefLabel: d.prefLabel!.trim(), altLabels: d.altLabels, kind: d.kind, status: d.status, notation: d.notation, scopeNote: d.scopeNote, altTextPhrase: d.altTextPhrase, feedsAltText: d.feedsAltText };
        const match = d.uri === null ? undefined : byUri.get(d.uri);
        if (match) {
          before.set(match, snapshot(match));
          match.set({ ...fields, conceptUri: match.conceptUri ?? d.uri });
          matched.add(match);
          saved.set(d.ref, match);
        } else {
          saved.set(d.ref, await Subject.create({ collectionId, ...fields, broaderId: null, conceptUri: d.uri }, { transaction }));
        }
      }
      let created = 0;
      let updated = 0;
      for (const d of reading.concepts) {
        const s = saved.get(d.ref)!;
        const broaderId = d.broader === null ? null : saved.get(d.broader)!.id;
        if (matched.has(s)) {
          s.set({ broaderId });
          if (snapshot(s) !== before.get(s)) {
            await s.save({ transaction });
            updated++;
          }
        } else {
          // a new subject: its tree link and (for a row without one) a minted URI, without a new version
          const conceptUri = s.conceptUri ?? conceptUriOf(s, c.slug, base);
          await Subject.update({ broaderId, conceptUri }, { where: { id: s.id }, transaction });
          created++;
        }
      }
      const report: ImportReport = { dryRun, concepts: reading.concepts.length, created, updated, untouched: existing.length - matched.size, warnings: reading.warnings };
      if (dryRun) throw new DryRunDone(report);
      await audit({ action: 'vocabulary-imported', actorId: actor.id, ip: actor.ip, targetType: 'collection', targetId: collectionId, detail: { format, concepts: report.concepts, created, updated, untouched: report.untouched, warnings: report.warnings.length } }, transaction);
      return report;
    });
  } catch (err) {
    if (err instanceof DryRunDone) return err.report;
    throw err;
  }
}
