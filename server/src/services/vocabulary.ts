import { UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import type { SubjectCreate, SubjectMove, SubjectUpdate } from '../../../common/schemas/subject.ts';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Subject } from '../models/index.ts';
import { audit } from './audit.ts';
import type { Actor } from './review.ts';

/**
 * A collection's vocabulary: subjects and form terms in a broader/narrower tree. Every change is
 * optimistically locked on `subjects.version` (a stale copy gets 409), and a move that would make a
 * subject narrower than itself is refused: Cartouche keeps the tree free of cycles (its own rule; the
 * SKOS Reference does not forbid cycles in skos:broader).
 */

export interface SubjectRecord {
  id: number;
  collectionId: number;
  prefLabel: string;
  altLabels: string[];
  kind: 'subject' | 'form';
  broaderId: number | null;
  notation: string | null;
  scopeNote: string | null;
  altTextPhrase: string | null;
  conceptUri: string;
  status: 'draft' | 'active' | 'retired';
  feedsAltText: boolean;
  version: number;
}

/** Where minted concept URIs live: `CARTOUCHE_CONCEPT_BASE`, or `<public URL>/vocabulary/`. */
export function conceptBase(publicUrl: string, env: NodeJS.ProcessEnv = process.env): string {
  const base = env.CARTOUCHE_CONCEPT_BASE?.trim() || new URL('/vocabulary/', publicUrl).href;
  return base.endsWith('/') || base.endsWith('#') ? base : `${base}/`;
}

/** The URI a subject is cited by: its own, or one minted from the base, the collection's short name and the subject's id. */
export function conceptUriOf(s: Pick<Subject, 'id' | 'conceptUri'>, collectionSlug: string, base: string): string {
  return s.conceptUri ?? `${base}${collectionSlug}/${s.id}`;
}

export function subjectRecord(s: Subject, collectionSlug: string, base: string): SubjectRecord {
  return {
    id: s.id,
    collectionId: s.collectionId,
    prefLabel: s.prefLabel,
    altLabels: s.altLabels,
    kind: s.kind,
    broaderId: s.broaderId,
    notation: s.notation,
    scopeNote: s.scopeNote,
    altTextPhrase: s.altTextPhrase,
    conceptUri: conceptUriOf(s, collectionSlug, base),
    status: s.status,
    feedsAltText: s.feedsAltText,
    version: s.version,
  };
}

/** The fields of a subject an archivist edits, as the audit trail records them. */
const SUBJECT_FIELDS = ['prefLabel', 'altLabels', 'kind', 'broaderId', 'notation', 'scopeNote', 'altTextPhrase', 'conceptUri', 'status', 'feedsAltText'] as const;

/** Long texts (scope notes, house style) are recorded in the audit trail only up to this many characters. */
const AUDIT_TEXT_LIMIT = 200;

function auditValue(v: unknown): unknown {
  if (typeof v === 'string' && v.length > AUDIT_TEXT_LIMIT) return `${v.slice(0, AUDIT_TEXT_LIMIT)}… (${v.length} characters)`;
  if (v instanceof Date) return v.toISOString();
  return v === undefined ? null : v;
}

/** What an edit changed, field by field, for an audit event's detail: `{ field: { from, to } }`; unchanged fields are left out. */
export function auditChanges(before: Record<string, unknown>, after: Record<string, unknown>, fields: readonly string[]): Record<string, { from: unknown; to: unknown }> {
  const changes: Record<string, { from: unknown; to: unknown }> = {};
  for (const f of fields) {
    const from = auditValue(before[f]);
    const to = auditValue(after[f]);
    if (JSON.stringify(from) !== JSON.stringify(to)) changes[f] = { from, to };
  }
  return changes;
}

function subjectFields(s: Subject): Record<string, unknown> {
  return Object.fromEntries(SUBJECT_FIELDS.map((f) => [f, s.get(f)]));
}

function labelTaken(label: string): HttpProblem {
  return new HttpProblem(409, 'Label in use', `This collection already has a subject called “${label}”.`, { errors: [{ path: 'prefLabel', message: 'Another subject of this collection has this preferred label.' }] });
}

function stale(s: Subject): HttpProblem {
  return new HttpProblem(409, 'Changed by someone else', `“${s.prefLabel}” was changed after this copy was opened (now version ${s.version}). Reload it, then make the change again.`, { type: '/problems/stale-version' });
}

/** Refuses a broader subject from another collection, the subject itself, or one of its own narrower subjects. */
async function checkBroader(collectionId: number, subjectId: number | null, broaderId: number | null, transaction: Transaction): Promise<void> {
  if (broaderId === null) return;
  if (broaderId === subjectId) throw new HttpProblem(422, 'Not narrower than itself', 'A subject cannot be narrower than itself.', { errors: [{ path: 'broaderId', message: 'Choose another broader subject.' }] });
  const all = await Subject.findAll({ where: { collectionId }, attributes: ['id', 'broaderId', 'prefLabel'], transaction });
  const byId = new Map(all.map((s) => [s.id, s]));
  if (!byId.has(broaderId)) throw new HttpProblem(422, 'No such broader subject', 'The broader subject must belong to the same collection.', { errors: [{ path: 'broaderId', message: 'Not a subject of this collection.' }] });
  if (subjectId === null) return;
  // walk up from the new broader subject: meeting the subject itself means it would become its own ancestor
  const seen = new Set<number>();
  for (let at: number | null = broaderId; at !== null && !seen.has(at); at = byId.get(at)?.broaderId ?? null) {
    if (at === subjectId) {
      const target = byId.get(broaderId)!;
      throw new HttpProblem(422, 'Would make a loop', `“${target.prefLabel}” is already narrower than this subject, so this subject cannot go under it.`, { errors: [{ path: 'broaderId', message: 'That subject is narrower than this one.' }] });
    }
    seen.add(at);
  }
}

/**
 * Creates a subject; one without a concept URI gets one minted under `base` and stored, so it stays the same if the collection is renamed.
 * The `subject-created` audit event is written in the same transaction.
 */
export async function createSubject(sequelize: Sequelize, collectionId: number, input: SubjectCreate, base: string, actor: Actor): Promise<Subject> {
  try {
    return await sequelize.transaction(async (transaction) => {
      const c = await Collection.findByPk(collectionId, { transaction });
      if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
      if (c.archivedAt) throw new HttpProblem(409, 'Collection archived', `${c.name} is archived; restore it before changing its vocabulary.`);
      await checkBroader(collectionId, null, input.broaderId, transaction);
      await checkUriFree(collectionId, null, input.conceptUri, transaction);
      const s = await Subject.create({ collectionId, ...input }, { transaction });
      if (s.conceptUri === null) {
        const uri = conceptUriOf(s, c.slug, base);
        await Subject.update({ conceptUri: uri }, { where: { id: s.id }, transaction });
        s.conceptUri = uri;
      }
      await audit({ action: 'subject-created', actorId: actor.id, ip: actor.ip, targetType: 'subject', targetId: s.id, detail: { collectionId, prefLabel: s.prefLabel, kind: s.kind, status: s.status, broaderId: s.broaderId, conceptUri: s.conceptUri } }, transaction);
      return s;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw labelTaken(input.prefLabel);
    throw err;
  }
}

async function checkUriFree(collectionId: number, subjectId: number | null, uri: string | null, transaction: Transaction): Promise<void> {
  if (uri === null) return;
  const other = await Subject.findOne({ where: { collectionId, conceptUri: uri }, attributes: ['id', 'prefLabel'], transaction });
  if (other && other.id !== subjectId) throw new HttpProblem(409, 'Concept URI in use', `“${other.prefLabel}” already has the concept URI ${uri}.`, { errors: [{ path: 'conceptUri', message: 'Another subject of this collection has this URI.' }] });
}

async function lockedSubject(id: number, version: number, transaction: Transaction): Promise<Subject> {
  const s = await Subject.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
  if (!s) throw new HttpProblem(404, 'Not found', 'No such subject.');
  if (s.version !== version) throw stale(s);
  return s;
}

/**
 * Saves a subject's whole record from the editor's copy. Its audit event (`subject-retired` when the status
 * becomes retired, else `subject-changed`) lists the fields changed with old and new values; a save that
 * changes nothing writes none.
 */
export async function updateSubject(sequelize: Sequelize, id: number, input: SubjectUpdate, actor: Actor): Promise<Subject> {
  const { version, ...fields } = input;
  try {
    return await sequelize.transaction(async (transaction) => {
      const s = await lockedSubject(id, version, transaction);
      await checkBroader(s.collectionId, s.id, fields.broaderId, transaction);
      await checkUriFree(s.collectionId, s.id, fields.conceptUri, transaction);
      const before = subjectFields(s);
      // an emptied URI field keeps the URI the subject is already cited by
      s.set({ ...fields, conceptUri: fields.conceptUri ?? s.conceptUri });
      const saved = await s.save({ transaction });
      const changes = auditChanges(before, subjectFields(saved), SUBJECT_FIELDS);
      if (Object.keys(changes).length > 0) {
        const action = changes.status && saved.status === 'retired' ? 'subject-retired' : 'subject-changed';
        await audit({ action, actorId: actor.id, ip: actor.ip, targetType: 'subject', targetId: saved.id, detail: { prefLabel: saved.prefLabel, version: saved.version, changes } }, transaction);
      }
      return saved;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw labelTaken(input.prefLabel);
    throw err;
  }
}

export async function moveSubject(sequelize: Sequelize, id: number, input: SubjectMove, actor: Actor): Promise<Subject> {
  return sequelize.transaction(async (transaction) => {
    const s = await lockedSubject(id, input.version, transaction);
    await checkBroader(s.collectionId, s.id, input.broaderId, transaction);
    const from = s.broaderId;
    s.set({ broaderId: input.broaderId });
    const saved = await s.save({ transaction });
    if (from !== saved.broaderId) await audit({ action: 'subject-moved', actorId: actor.id, ip: actor.ip, targetType: 'subject', targetId: saved.id, detail: { prefLabel: saved.prefLabel, version: saved.version, changes: { broaderId: { from, to: saved.broaderId } } } }, transaction);
    return saved;
  });
}
