import { QueryTypes, type Sequelize } from 'sequelize';

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
