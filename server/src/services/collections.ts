import { Op, QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import type { CollectionCreate, CollectionDetail, CollectionUpdate } from '../../../common/schemas/collection.ts';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Subject } from '../models/index.ts';
import { audit } from './audit.ts';
import type { Actor } from './review.ts';
import { auditChanges } from './vocabulary.ts';

export interface CollectionSummary {
  id: number;
  slug: string;
  name: string;
  description: string;
  medium: string;
  itemCount: number;
  subjectCount: number;
  formCount: number;
  /** items with at least one proposed suggestion waiting for an editor */
  suggestedCount: number;
  /** items whose alt text (or decorative status) has been approved */
  approvedCount: number;
  decorativeCount: number;
  lastRunAt: string | null;
}

/** Every collection that is not archived, with the counts the overview shows, in one round trip. */
export async function listCollectionSummaries(sequelize: Sequelize): Promise<CollectionSummary[]> {
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT c.id, c.slug, c.name, c.description, c.medium,
            COALESCE(i.item_count, 0) AS itemCount,
            COALESCE(i.approved_count, 0) AS approvedCount,
            COALESCE(i.decorative_count, 0) AS decorativeCount,
            COALESCE(s.subject_count, 0) AS subjectCount,
            COALESCE(s.form_count, 0) AS formCount,
            COALESCE(w.suggested_count, 0) AS suggestedCount,
            r.last_run_at AS lastRunAt
       FROM collections c
       LEFT JOIN (SELECT collection_id, COUNT(*) AS item_count,
                         SUM(state = 'approved') AS approved_count,
                         SUM(state = 'approved' AND decorative) AS decorative_count
                    FROM items GROUP BY collection_id) i ON i.collection_id = c.id
       LEFT JOIN (SELECT collection_id, SUM(kind = 'subject') AS subject_count, SUM(kind = 'form') AS form_count
                    FROM subjects WHERE status <> 'retired' GROUP BY collection_id) s ON s.collection_id = c.id
       LEFT JOIN (SELECT it.collection_id, COUNT(DISTINCT it.id) AS suggested_count
                    FROM items it JOIN suggestions sg ON sg.item_id = it.id AND sg.state = 'proposed'
                   WHERE it.state <> 'approved' GROUP BY it.collection_id) w ON w.collection_id = c.id
       LEFT JOIN (SELECT collection_id, MAX(COALESCE(finished_at, started_at, created_at)) AS last_run_at
                    FROM runs GROUP BY collection_id) r ON r.collection_id = c.id
      WHERE c.archived_at IS NULL
      ORDER BY c.name`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    id: Number(r.id),
    slug: String(r.slug),
    name: String(r.name),
    description: String(r.description),
    medium: String(r.medium),
    itemCount: Number(r.itemCount),
    subjectCount: Number(r.subjectCount),
    formCount: Number(r.formCount),
    suggestedCount: Number(r.suggestedCount),
    approvedCount: Number(r.approvedCount),
    decorativeCount: Number(r.decorativeCount),
    lastRunAt: r.lastRunAt ? new Date(r.lastRunAt as string).toISOString() : null,
  }));
}

// ------------------------------------------------------------------ settings: create, edit, archive



export type { CollectionDetail };

export async function collectionDetail(c: Collection): Promise<CollectionDetail> {
  const feeding = await Subject.findAll({ where: { collectionId: c.id, feedsAltText: true }, attributes: ['id'], order: [['id', 'ASC']] });
  return {
    id: c.id,
    slug: c.slug,
    name: c.name,
    description: c.description,
    medium: c.medium,
    altTextLanguage: c.altTextLanguage,
    altTextMaxLength: c.altTextMaxLength,
    houseStyle: c.houseStyle,
    scheduleCron: c.scheduleCron,
    scheduleTimezone: c.scheduleTimezone,
    scheduleEnabled: c.scheduleEnabled,
    dropFolder: c.dropFolder ?? '',
    readText: c.readText,
    archivedAt: c.archivedAt ? c.archivedAt.toISOString() : null,
    updatedAt: c.updatedAt.toISOString(),
    feedingSubjectIds: feeding.map((s) => s.id),
  };
}

export async function collectionOr404(id: number): Promise<Collection> {
  const c = await Collection.findByPk(id);
  if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
  return c;
}

function slugTaken(slug: string): HttpProblem {
  return new HttpProblem(409, 'Short name in use', `Another collection (perhaps an archived one) already uses the short name “${slug}”.`, { errors: [{ path: 'slug', message: 'Already used by another collection.' }] });
}

export async function createCollection(input: CollectionCreate, actor: Actor): Promise<Collection> {
  try {
    return await Collection.sequelize!.transaction(async (transaction) => {
      const c = await Collection.create({ ...input, dropFolder: null, archivedAt: null }, { transaction });
      await audit({ action: 'collection-created', actorId: actor.id, ip: actor.ip, targetType: 'collection', targetId: c.id, detail: { slug: c.slug, name: c.name } }, transaction);
      return c;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw slugTaken(input.slug);
    throw err;
  }
}

/**
 * Saves every setting of a collection and which of its subjects feed alt-text drafts, in one transaction.
 * The copy must be as fresh as the stored one (`updatedAt`): otherwise 409 and nothing changes. The
 * `collection-changed` audit event (settings changed, old and new; feeding subjects added and removed) is
 * written in the same transaction, and only when something changed.
 */
export async function updateCollection(sequelize: Sequelize, id: number, input: CollectionUpdate, actor: Actor): Promise<Collection> {
  const { feedingSubjectIds, updatedAt, ...settings } = input;
  try {
    return await sequelize.transaction(async (transaction) => {
      const c = await Collection.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!c) throw new HttpProblem(404, 'Not found', 'No such collection.');
      if (c.updatedAt.getTime() !== new Date(updatedAt).getTime()) {
        throw new HttpProblem(409, 'Changed by someone else', `${c.name} was changed after this copy was opened. Reload it to see the change, then make yours again.`);
      }
      const own = await Subject.findAll({ where: { collectionId: id }, attributes: ['id', 'feedsAltText'], transaction });
      const ownIds = new Set(own.map((s) => s.id));
      const foreign = feedingSubjectIds.filter((s) => !ownIds.has(s));
      if (foreign.length > 0) throw new HttpProblem(400, 'Invalid request', `Subjects ${foreign.join(', ')} do not belong to this collection.`, { errors: [{ path: 'feedingSubjectIds', message: 'Only this collection’s subjects can feed its alt text.' }] });
      const before = Object.fromEntries(Object.keys(settings).map((k) => [k, c.get(k)]));
      await c.update(settings, { transaction });
      const feeding = new Set(feedingSubjectIds);
      const fed = new Set(own.filter((s) => s.feedsAltText).map((s) => s.id));
      const changes = auditChanges(before, Object.fromEntries(Object.keys(settings).map((k) => [k, c.get(k)])), Object.keys(settings));
      const feedingAdded = [...feeding].filter((s) => !fed.has(s)).sort((a, b) => a - b);
      const feedingRemoved = [...fed].filter((s) => !feeding.has(s)).sort((a, b) => a - b);
      if (Object.keys(changes).length > 0 || feedingAdded.length > 0 || feedingRemoved.length > 0) {
        await audit({ action: 'collection-changed', actorId: actor.id, ip: actor.ip, targetType: 'collection', targetId: id, detail: { changes, feedingAdded, feedingRemoved } }, transaction);
      }
      await Subject.update({ feedsAltText: true }, { where: { collectionId: id, id: [...feeding] }, transaction });
      await Subject.update({ feedsAltText: false }, { where: { collectionId: id, id: [...ownIds].filter((s) => !feeding.has(s)) }, transaction });
      return c;
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw slugTaken(settings.slug);
    throw err;
  }
}

/** Archiving hides a collection from every list and stops its schedule; nothing is deleted, and restoring brings it back. */
export async function setArchived(id: number, archived: boolean, actor: Actor): Promise<Collection> {
  const c = await collectionOr404(id);
  if (Boolean(c.archivedAt) === archived) return c;
  await Collection.sequelize!.transaction(async (transaction) => {
    await c.update({ archivedAt: archived ? new Date() : null }, { transaction });
    await audit({ action: archived ? 'collection-archived' : 'collection-restored', actorId: actor.id, ip: actor.ip, targetType: 'collection', targetId: id, detail: { slug: c.slug, name: c.name } }, transaction);
  });
  return c;
}

export async function listArchivedCollections(): Promise<Array<{ id: number; slug: string; name: string; medium: string; archivedAt: string }>> {
  const rows = await Collection.findAll({ where: { archivedAt: { [Op.ne]: null } }, order: [['name', 'ASC']] });
  return rows.map((c) => ({ id: c.id, slug: c.slug, name: c.name, medium: c.medium, archivedAt: c.archivedAt!.toISOString() }));
}
