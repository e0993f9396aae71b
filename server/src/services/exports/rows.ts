import { QueryTypes, type Sequelize } from 'sequelize';

/** One item as every export writes it: catalogue fields, the approved description and its accepted subjects. */
export interface ExportItem {
  id: number;
  identifier: string;
  fileName: string;
  caption: string | null;
  creator: string | null;
  dateText: string | null;
  rights: string | null;
  state: 'new' | 'suggested' | 'approved';
  /** the approved alt text; null until an editor approves it (drafts never leave Cartouche) */
  altText: string | null;
  /** the approved long description, null when there is none or the item is not approved */
  longDescription: string | null;
  decorative: boolean;
  approvedBy: number | null;
  approvedByName: string | null;
  approvedAt: Date | null;
  createdAt: Date;
  width: number | null;
  height: number | null;
  mimeType: string | null;
  viewKey: string | null;
  fileKey: string | null;
  /** accepted or editor-added subjects, forms first, then by label */
  subjects: Array<{ id: number; label: string; conceptUri: string | null; kind: 'subject' | 'form' }>;
}

interface RawItem {
  id: number;
  identifier: string;
  file_name: string;
  caption: string | null;
  creator: string | null;
  date_text: string | null;
  rights: string | null;
  state: ExportItem['state'];
  alt_text: string | null;
  long_description: string | null;
  decorative: number | boolean;
  approved_by: number | null;
  approver: string | null;
  approved_at: Date | null;
  created_at: Date;
  width: number | null;
  height: number | null;
  mime_type: string | null;
  view_key: string | null;
  file_key: string | null;
}

export interface ItemFilter {
  collectionId: number;
  /** only items that existed before this instant (the end of the period) */
  createdBefore?: Date | null;
  /** only approved items */
  approvedOnly?: boolean;
  /** only this item */
  itemId?: number;
}

export const PAGE_SIZE = 1000;

/**
 * The items of a collection in pages of `pageSize`, by id, each page read with a keyset condition
 * (`id > last id`), never OFFSET: the database does the same small amount of work for the last page as for
 * the first, and only one page is held in memory at a time.
 */
export async function* itemPages(sequelize: Sequelize, filter: ItemFilter, pageSize = PAGE_SIZE): AsyncGenerator<ExportItem[]> {
  let after = 0;
  for (;;) {
    const rows = await sequelize.query<RawItem>(
      `SELECT i.id, i.identifier, i.file_name, i.caption, i.creator, i.date_text, i.rights, i.state,
              i.alt_text, i.long_description, i.decorative, i.approved_by, u.display_name AS approver,
              i.approved_at, i.created_at, i.width, i.height, i.mime_type, i.view_key, i.file_key
         FROM items i LEFT JOIN users u ON u.id = i.approved_by
        WHERE i.collection_id = :collectionId AND i.id > :after
          ${filter.createdBefore ? 'AND i.created_at < :createdBefore' : ''}
          ${filter.approvedOnly ? "AND i.state = 'approved'" : ''}
          ${filter.itemId ? 'AND i.id = :itemId' : ''}
        ORDER BY i.id
        LIMIT :limit`,
      {
        type: QueryTypes.SELECT,
        replacements: { collectionId: filter.collectionId, after, createdBefore: filter.createdBefore ?? null, itemId: filter.itemId ?? null, limit: pageSize },
      },
    );
    if (rows.length === 0) return;
    after = rows[rows.length - 1]!.id;
    const subjects = await subjectsOf(sequelize, rows.map((r) => r.id));
    yield rows.map((r) => toItem(r, subjects.get(r.id) ?? []));
    if (rows.length < pageSize) return;
  }
}

/**
 * Line ends as LF: spreadsheet cells and XML text cannot keep a CR (an XML parser folds CRLF into LF, XML 1.0
 * §2.11), so every export writes the same text.
 */
export function lf(text: string): string {
  return text.replace(/\r\n?/g, '\n');
}

function toItem(r: RawItem, subjects: ExportItem['subjects']): ExportItem {
  const approved = r.state === 'approved';
  return {
    id: r.id,
    identifier: r.identifier,
    fileName: r.file_name,
    caption: r.caption === null ? null : lf(r.caption),
    creator: r.creator,
    dateText: r.date_text,
    rights: r.rights,
    state: r.state,
    altText: approved ? (r.decorative ? '' : lf(r.alt_text ?? '')) : null,
    longDescription: approved && !r.decorative && r.long_description ? lf(r.long_description) : null,
    decorative: Boolean(r.decorative),
    approvedBy: r.approved_by,
    approvedByName: r.approver,
    approvedAt: r.approved_at ? new Date(r.approved_at) : null,
    createdAt: new Date(r.created_at),
    width: r.width,
    height: r.height,
    mimeType: r.mime_type,
    viewKey: r.view_key,
    fileKey: r.file_key,
    subjects,
  };
}

async function subjectsOf(sequelize: Sequelize, itemIds: number[]): Promise<Map<number, ExportItem['subjects']>> {
  const out = new Map<number, ExportItem['subjects']>();
  if (itemIds.length === 0) return out;
  const rows = await sequelize.query<{ item_id: number; id: number; pref_label: string; concept_uri: string | null; kind: 'subject' | 'form' }>(
    `SELECT g.item_id, s.id, s.pref_label, s.concept_uri, s.kind
       FROM suggestions g JOIN subjects s ON s.id = g.subject_id
      WHERE g.item_id IN (:itemIds) AND g.state IN ('accepted', 'added')
      ORDER BY g.item_id, s.kind = 'form' DESC, s.pref_label`,
    { type: QueryTypes.SELECT, replacements: { itemIds } },
  );
  for (const r of rows) {
    let list = out.get(r.item_id);
    if (!list) out.set(r.item_id, (list = []));
    list.push({ id: r.id, label: r.pref_label, conceptUri: r.concept_uri, kind: r.kind });
  }
  return out;
}

/** How many items a filter selects (for progress). */
export async function countItems(sequelize: Sequelize, filter: ItemFilter): Promise<number> {
  const [row] = await sequelize.query<{ n: number }>(
    `SELECT COUNT(*) AS n FROM items WHERE collection_id = :collectionId
      ${filter.createdBefore ? 'AND created_at < :createdBefore' : ''} ${filter.approvedOnly ? "AND state = 'approved'" : ''}`,
    { type: QueryTypes.SELECT, replacements: { collectionId: filter.collectionId, createdBefore: filter.createdBefore ?? null } },
  );
  return Number(row?.n ?? 0);
}

/** One item as the exports write it, or null. */
export async function exportItem(sequelize: Sequelize, collectionId: number, itemId: number): Promise<ExportItem | null> {
  for await (const page of itemPages(sequelize, { collectionId, itemId }, 1)) return page[0] ?? null;
  return null;
}
