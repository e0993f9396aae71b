import { QueryTypes, type Sequelize } from 'sequelize';

/**
 * The figures of a coverage ledger for one collection and one period (instants [from, to); an open end is
 * null), aggregated in SQL. "Covered" means an editor approved the item's text alternative — alt text, or
 * an empty alt for an item marked decorative (WCAG 2.2 technique H67).
 */
export interface LedgerFigures {
  items: number;
  approved: number;
  decorative: number;
  approvedInPeriod: number;
  accepted: number;
  rejected: number;
  added: number;
  waiting: number;
}

export interface SubjectFigures {
  subjectId: number;
  label: string;
  kind: 'subject' | 'form';
  conceptUri: string | null;
  /** items carrying the subject now (accepted or added) */
  items: number;
  acceptedInPeriod: number;
  rejectedInPeriod: number;
  addedInPeriod: number;
  /** proposed suggestions nobody has decided yet */
  waiting: number;
}

export interface EditorFigures {
  userId: number;
  name: string;
  role: string;
  approved: number;
  decorative: number;
  accepted: number;
  rejected: number;
  added: number;
  lastActivity: Date | null;
}

export interface PeriodBounds {
  from: Date | null;
  to: Date | null;
}

const within = (column: string) => `(:from IS NULL OR ${column} >= :from) AND (:to IS NULL OR ${column} < :to)`;

export async function ledgerFigures(sequelize: Sequelize, collectionId: number, period: PeriodBounds): Promise<LedgerFigures> {
  const replacements = { collectionId, from: period.from, to: period.to };
  const [items] = await sequelize.query<{ items: number; approved: number; decorative: number; approved_in_period: number }>(
    `SELECT COUNT(*) AS items,
            COALESCE(SUM(state = 'approved'), 0) AS approved,
            COALESCE(SUM(state = 'approved' AND decorative), 0) AS decorative,
            COALESCE(SUM(state = 'approved' AND ${within('approved_at')}), 0) AS approved_in_period
       FROM items WHERE collection_id = :collectionId AND (:to IS NULL OR created_at < :to)`,
    { type: QueryTypes.SELECT, replacements },
  );
  const [decisions] = await sequelize.query<{ accepted: number; rejected: number; added: number; waiting: number }>(
    `SELECT COALESCE(SUM(g.state = 'accepted' AND ${within('g.decided_at')}), 0) AS accepted,
            COALESCE(SUM(g.state = 'rejected' AND ${within('g.decided_at')}), 0) AS rejected,
            COALESCE(SUM(g.state = 'added' AND ${within('g.decided_at')}), 0) AS added,
            COALESCE(SUM(g.state = 'proposed'), 0) AS waiting
       FROM suggestions g JOIN items i ON i.id = g.item_id
      WHERE i.collection_id = :collectionId`,
    { type: QueryTypes.SELECT, replacements },
  );
  return {
    items: Number(items?.items ?? 0),
    approved: Number(items?.approved ?? 0),
    decorative: Number(items?.decorative ?? 0),
    approvedInPeriod: Number(items?.approved_in_period ?? 0),
    accepted: Number(decisions?.accepted ?? 0),
    rejected: Number(decisions?.rejected ?? 0),
    added: Number(decisions?.added ?? 0),
    waiting: Number(decisions?.waiting ?? 0),
  };
}

export async function subjectFigures(sequelize: Sequelize, collectionId: number, period: PeriodBounds): Promise<SubjectFigures[]> {
  const rows = await sequelize.query<{
    id: number;
    pref_label: string;
    kind: 'subject' | 'form';
    concept_uri: string | null;
    items: number;
    accepted: number;
    rejected: number;
    added: number;
    waiting: number;
  }>(
    `SELECT s.id, s.pref_label, s.kind, s.concept_uri,
            COALESCE(SUM(g.state IN ('accepted', 'added')), 0) AS items,
            COALESCE(SUM(g.state = 'accepted' AND ${within('g.decided_at')}), 0) AS accepted,
            COALESCE(SUM(g.state = 'rejected' AND ${within('g.decided_at')}), 0) AS rejected,
            COALESCE(SUM(g.state = 'added' AND ${within('g.decided_at')}), 0) AS added,
            COALESCE(SUM(g.state = 'proposed'), 0) AS waiting
       FROM subjects s LEFT JOIN suggestions g ON g.subject_id = s.id
      WHERE s.collection_id = :collectionId AND s.status <> 'draft'
      GROUP BY s.id, s.pref_label, s.kind, s.concept_uri
      ORDER BY s.kind = 'form' DESC, s.pref_label`,
    { type: QueryTypes.SELECT, replacements: { collectionId, from: period.from, to: period.to } },
  );
  return rows.map((r) => ({
    subjectId: r.id,
    label: r.pref_label,
    kind: r.kind,
    conceptUri: r.concept_uri,
    items: Number(r.items),
    acceptedInPeriod: Number(r.accepted),
    rejectedInPeriod: Number(r.rejected),
    addedInPeriod: Number(r.added),
    waiting: Number(r.waiting),
  }));
}

export async function editorFigures(sequelize: Sequelize, collectionId: number, period: PeriodBounds): Promise<EditorFigures[]> {
  const rows = await sequelize.query<{
    user_id: number;
    name: string;
    role: string;
    approved: number;
    decorative: number;
    accepted: number;
    rejected: number;
    added: number;
    last_activity: Date | null;
  }>(
    `SELECT u.id AS user_id, u.display_name AS name, u.role,
            COALESCE(SUM(a.approved), 0) AS approved, COALESCE(SUM(a.decorative), 0) AS decorative,
            COALESCE(SUM(a.accepted), 0) AS accepted, COALESCE(SUM(a.rejected), 0) AS rejected,
            COALESCE(SUM(a.added), 0) AS added, MAX(a.at) AS last_activity
       FROM (
         SELECT approved_by AS user_id, 1 AS approved, decorative + 0 AS decorative, 0 AS accepted, 0 AS rejected, 0 AS added, approved_at AS at
           FROM items WHERE collection_id = :collectionId AND state = 'approved' AND approved_by IS NOT NULL AND ${within('approved_at')}
         UNION ALL
         SELECT g.decided_by, 0, 0, g.state = 'accepted', g.state = 'rejected', g.state = 'added', g.decided_at
           FROM suggestions g JOIN items i ON i.id = g.item_id
          WHERE i.collection_id = :collectionId AND g.decided_by IS NOT NULL AND g.state <> 'proposed' AND ${within('g.decided_at')}
       ) a JOIN users u ON u.id = a.user_id
      GROUP BY u.id, u.display_name, u.role
      ORDER BY approved DESC, u.display_name`,
    { type: QueryTypes.SELECT, replacements: { collectionId, from: period.from, to: period.to } },
  );
  return rows.map((r) => ({
    userId: r.user_id,
    name: r.name,
    role: r.role,
    approved: Number(r.approved),
    decorative: Number(r.decorative),
    accepted: Number(r.accepted),
    rejected: Number(r.rejected),
    added: Number(r.added),
    lastActivity: r.last_activity ? new Date(r.last_activity) : null,
  }));
}

/** accepted ÷ (accepted + rejected): the share of decided suggestions that were right; null with none decided. */
export function precision(accepted: number, rejected: number): number | null {
  return accepted + rejected === 0 ? null : accepted / (accepted + rejected);
}
