import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { HttpProblem } from '../http/problem.ts';
import { Item, SubjectModel, User } from '../models/index.ts';
import { AuditEvent } from '../models/index.ts';
import type { ItemState } from '../models/item.ts';
import type { CatalogueRow, HistoryEntry } from '../../../common/review/types.ts';

export type { CatalogueRow, HistoryEntry } from '../../../common/review/types.ts';

/**
 * The catalogue: every item of a collection, searchable across its identifier, caption, alt text, long
 * description, the text OCR found in it and the preferred and alternative labels of its confirmed subjects.
 *
 * Search runs on a FULLTEXT index over `items.search_text`, a column this service keeps: it is rebuilt for an
 * item whenever the review desk or OCR changes it, and before every search for any item saved elsewhere since
 * (compared by `updated_at`) or confirmed with a subject relabelled since, so an import or a new alternative
 * label is found at once.
 */

// InnoDB's default full-text stop words (information_schema.INNODB_FT_DEFAULT_STOPWORD) and its minimum token
// size (innodb_ft_min_token_size = 3): a required term that is a stop word or too short would match nothing.
const INNODB_STOPWORDS = new Set(['a', 'about', 'an', 'are', 'as', 'at', 'be', 'by', 'com', 'de', 'en', 'for', 'from', 'how', 'i', 'in', 'is', 'it', 'la', 'of', 'on', 'or', 'that', 'the', 'this', 'to', 'was', 'what', 'when', 'where', 'who', 'will', 'with', 'und', 'www']);
export const MIN_TOKEN = 3;

const SEARCH_TEXT_SQL = `CONCAT_WS(' ', i.identifier, REGEXP_REPLACE(i.identifier, '[^[:alnum:]]+', ''), i.caption, i.creator, i.date_text, i.alt_text, i.long_description, i.ocr_text,
  (SELECT GROUP_CONCAT(CONCAT_WS(' ', s.pref_label, REGEXP_REPLACE(CAST(s.alt_labels AS CHAR), '[][",]+', ' ')) SEPARATOR ' ')
     FROM suggestions g JOIN subjects s ON s.id = g.subject_id
    WHERE g.item_id = i.id AND g.state IN ('accepted', 'added')))`;

/** Rebuilds the search text of these items (inside the caller's transaction when given). */
export async function syncSearchText(sequelize: Sequelize, itemIds: readonly number[], transaction?: Transaction): Promise<void> {
  if (itemIds.length === 0) return;
  await sequelize.query(`UPDATE items i SET i.search_text = ${SEARCH_TEXT_SQL}, i.search_synced_at = NOW(3) WHERE i.id IN (:itemIds)`, {
    replacements: { itemIds },
    transaction,
  });
}

/**
 * Rebuilds the search text of a collection's items that changed since it was last built: items saved since
 * (`updated_at`, which every model save and import moves), and items confirmed with a subject whose labels
 * changed since. Decisions made through the review desk rebuild their item at once (syncSearchText).
 */
export async function syncStaleSearchText(sequelize: Sequelize, collectionId: number): Promise<number> {
  const [, changed] = await sequelize.query(
    `UPDATE items i SET i.search_text = ${SEARCH_TEXT_SQL}, i.search_synced_at = NOW(3)
      WHERE i.collection_id = :collectionId AND (i.search_synced_at IS NULL OR i.updated_at > i.search_synced_at)`,
    { replacements: { collectionId } },
  );
  let affected = Number((changed as { affectedRows?: number } | undefined)?.affectedRows ?? 0);
  const relabelled = await sequelize.query<{ id: number; updated_at: Date }>(
    `SELECT s.id, s.updated_at FROM subjects s
      WHERE s.collection_id = :collectionId
        AND s.updated_at > COALESCE((SELECT MIN(i.search_synced_at) FROM items i WHERE i.collection_id = :collectionId), '1970-01-01')`,
    { type: QueryTypes.SELECT, replacements: { collectionId } },
  );
  for (const subject of relabelled) {
    const [, meta] = await sequelize.query(
      `UPDATE items i JOIN suggestions g ON g.item_id = i.id AND g.subject_id = :subjectId AND g.state IN ('accepted', 'added')
          SET i.search_text = ${SEARCH_TEXT_SQL}, i.search_synced_at = NOW(3)
        WHERE i.collection_id = :collectionId AND i.search_synced_at < :changedAt`,
      { replacements: { collectionId, subjectId: Number(subject.id), changedAt: subject.updated_at } },
    );
    affected += Number((meta as { affectedRows?: number } | undefined)?.affectedRows ?? 0);
  }
  return affected;
}

/**
 * A person's words as an InnoDB BOOLEAN MODE query: every word required, each matched as a prefix ("light"
 * finds "lighthouse"); punctuation splits words (so an identifier's parts are words too). Stop words and
 * words under the minimum token size are left out because the index holds no such tokens. Null when
 * nothing searchable is left.
 */
export function booleanQuery(text: string): string | null {
  const words = text
    .toLowerCase()
    .normalize('NFKC')
    .split(/[^\p{L}\p{N}]+/u)
    .filter((w) => w.length >= MIN_TOKEN && !INNODB_STOPWORDS.has(w));
  if (words.length === 0) return null;
  return [...new Set(words)].map((w) => `+${w}*`).join(' ');
}

export interface CatalogueQuery {
  collectionId: number;
  q?: string;
  state?: ItemState;
  subjectId?: number;
  reviewerId?: number;
  /** approval date range, inclusive (YYYY-MM-DD) */
  from?: string;
  to?: string;
  page: number;
  pageSize: number;
}


export async function searchCatalogue(sequelize: Sequelize, query: CatalogueQuery): Promise<{ items: CatalogueRow[]; total: number; page: number; pageSize: number; ignoredWords: string[] }> {
  await syncStaleSearchText(sequelize, query.collectionId);
  const where = ['i.collection_id = :collectionId'];
  const replacements: Record<string, unknown> = { collectionId: query.collectionId };
  const ignoredWords: string[] = [];
  if (query.q && query.q.trim()) {
    const q = booleanQuery(query.q);
    for (const w of query.q.toLowerCase().split(/[^\p{L}\p{N}]+/u)) if (w && (w.length < MIN_TOKEN || INNODB_STOPWORDS.has(w))) ignoredWords.push(w);
    if (q) {
      where.push('(MATCH(i.search_text) AGAINST (:q IN BOOLEAN MODE) OR i.identifier = :exact)');
      replacements.q = q;
    } else {
      where.push('(i.identifier = :exact OR i.search_text LIKE :like)');
      replacements.like = `%${query.q.trim().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    }
    replacements.exact = query.q.trim();
  }
  if (query.state) {
    where.push('i.state = :state');
    replacements.state = query.state;
  }
  if (query.subjectId) {
    where.push("EXISTS (SELECT 1 FROM suggestions g WHERE g.item_id = i.id AND g.subject_id = :subjectId AND g.state IN ('accepted', 'added'))");
    replacements.subjectId = query.subjectId;
  }
  if (query.reviewerId) {
    where.push("(i.approved_by = :reviewerId OR EXISTS (SELECT 1 FROM suggestions g WHERE g.item_id = i.id AND g.decided_by = :reviewerId))");
    replacements.reviewerId = query.reviewerId;
  }
  if (query.from) {
    where.push('i.approved_at >= :from');
    replacements.from = `${query.from} 00:00:00`;
  }
  if (query.to) {
    where.push('i.approved_at < DATE_ADD(:to, INTERVAL 1 DAY)');
    replacements.to = query.to;
  }
  const clause = where.join(' AND ');
  const [{ total }] = (await sequelize.query<{ total: number }>(`SELECT COUNT(*) AS total FROM items i WHERE ${clause}`, { type: QueryTypes.SELECT, replacements })) as [{ total: number }];
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT i.id, i.identifier, i.caption, i.alt_text, i.decorative, i.state, i.approved_at, u.id AS approver_id, u.display_name AS approver_name,
            (SELECT GROUP_CONCAT(s.pref_label ORDER BY s.pref_label SEPARATOR '\\n') FROM suggestions g JOIN subjects s ON s.id = g.subject_id
              WHERE g.item_id = i.id AND g.state IN ('accepted', 'added')) AS subjects
       FROM items i LEFT JOIN users u ON u.id = i.approved_by
      WHERE ${clause}
      ORDER BY ${replacements.q ? 'MATCH(i.search_text) AGAINST (:q IN BOOLEAN MODE) DESC, ' : ''}i.identifier
      LIMIT :limit OFFSET :offset`,
    { type: QueryTypes.SELECT, replacements: { ...replacements, limit: query.pageSize, offset: (query.page - 1) * query.pageSize } },
  );
  return {
    total: Number(total),
    page: query.page,
    pageSize: query.pageSize,
    ignoredWords,
    items: rows.map((r) => ({
      id: Number(r.id),
      identifier: String(r.identifier),
      caption: (r.caption as string | null) ?? null,
      altText: (r.alt_text as string | null) ?? null,
      decorative: Boolean(r.decorative),
      state: r.state as ItemState,
      approvedAt: r.approved_at ? new Date(r.approved_at as string).toISOString() : null,
      approvedBy: r.approver_id ? { id: Number(r.approver_id), name: String(r.approver_name) } : null,
      subjects: r.subjects ? String(r.subjects).split('\n') : [],
      thumbUrl: `/api/items/${Number(r.id)}/thumbnail`,
    })),
  };
}

/** The people who decided something in a collection, and its subjects: the choices of the catalogue's filters. */
export async function catalogueFacets(sequelize: Sequelize, collectionId: number): Promise<{ reviewers: Array<{ id: number; name: string }>; subjects: Array<{ id: number; prefLabel: string; kind: string }> }> {
  const reviewers = await sequelize.query<{ id: number; name: string }>(
    `SELECT DISTINCT u.id, u.display_name AS name FROM users u
      WHERE EXISTS (SELECT 1 FROM items i WHERE i.collection_id = :collectionId AND i.approved_by = u.id)
         OR EXISTS (SELECT 1 FROM suggestions g JOIN items i ON i.id = g.item_id WHERE i.collection_id = :collectionId AND g.decided_by = u.id)
      ORDER BY u.display_name`,
    { type: QueryTypes.SELECT, replacements: { collectionId } },
  );
  const subjects = await sequelize.query<{ id: number; prefLabel: string; kind: string }>(
    "SELECT id, pref_label AS prefLabel, kind FROM subjects WHERE collection_id = :collectionId AND status <> 'retired' ORDER BY kind DESC, pref_label",
    { type: QueryTypes.SELECT, replacements: { collectionId } },
  );
  return { reviewers: reviewers.map((r) => ({ id: Number(r.id), name: r.name })), subjects: subjects.map((s) => ({ ...s, id: Number(s.id) })) };
}


const ACTION_WORDS: Record<string, string> = {
  'item-ingested': 'brought in',
  'metadata-imported': 'catalogue fields imported',
  'review-subject-accepted': 'accepted subject',
  'review-subject-added': 'added subject',
  'review-subject-rejected': 'rejected subject',
  'review-subject-undone': 'undid decision on subject',
  'review-description-saved': 'saved alt text and long description',
  'review-item-approved': 'approved',
  'review-item-skipped': 'skipped',
  'review-caption-flagged': 'flagged the caption',
  'review-caption-unflagged': 'cleared the caption flag',
  'review-example-promoted': 'promoted to an example of',
  'review-second-recorded': 'recorded a blind second review',
  'review-ocr-read': 'read text in the image',
};

/** One item's history: who decided what, when, and from which model version. */
export async function itemHistory(itemId: number): Promise<HistoryEntry[]> {
  const events = await AuditEvent.findAll({ where: { targetType: 'item', targetId: String(itemId) }, order: [['createdAt', 'ASC'], ['id', 'ASC']] });
  const actorIds = [...new Set(events.map((e) => e.actorId).filter((id): id is number => id !== null))];
  const people = new Map((await User.findAll({ where: { id: actorIds }, attributes: ['id', 'displayName'] })).map((u) => [u.id, u.displayName]));
  const modelIds = [...new Set(events.map((e) => Number(e.detail?.subjectModelId)).filter((id) => Number.isInteger(id) && id > 0))];
  const models = new Map((await SubjectModel.findAll({ where: { id: modelIds }, attributes: ['id', 'version', 'method'] })).map((m) => [m.id, m]));
  return events.map((e) => {
    const d = e.detail ?? {};
    const model = models.get(Number(d.subjectModelId));
    const subject = typeof d.subjectId === 'number' ? { id: d.subjectId, label: String(d.subjectLabel ?? `subject ${d.subjectId}`) } : null;
    const words = ACTION_WORDS[e.action] ?? e.action;
    return {
      at: e.createdAt.toISOString(),
      action: e.action,
      actor: e.actorId ? { id: e.actorId, name: people.get(e.actorId) ?? `person ${e.actorId}` } : null,
      summary: subject ? `${words} “${subject.label}”` : words,
      subject,
      model: model ? { id: model.id, version: model.version, method: model.method } : null,
      detail: e.detail,
    };
  });
}

export async function itemOr404(id: number, transaction?: Transaction): Promise<Item> {
  const item = await Item.findByPk(id, { transaction, ...(transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!item) throw new HttpProblem(404, 'Not found', `There is no item ${id}.`);
  return item;
}
