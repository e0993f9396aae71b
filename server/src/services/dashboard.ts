import { QueryTypes, type Sequelize } from 'sequelize';
import { collectionAgreement } from './agreement.ts';
import { precision, subjectFigures } from './exports/figures.ts';
import { addDays } from './exports/time.ts';

/**
 * The managers' dashboard: aggregates computed in SQL. Weeks are ISO weeks (Monday to Sunday) in UTC,
 * named by their Monday; a collection's own time zone matters for its ledger, not for these trends.
 */

export interface CoveragePoint {
  /** the week's Monday, YYYY-MM-DD */
  week: string;
  /** items that existed at the end of the week */
  items: number;
  /** of them, approved by the end of the week (alt text or decorative) */
  approved: number;
  coverage: number | null;
}

export interface CoverageSeries {
  collectionId: number;
  name: string;
  points: CoveragePoint[];
}

/** Mondays of the last `weeks` ISO weeks up to the one `now` falls in, oldest first. */
export function weekStarts(now: Date, weeks: number): string[] {
  const today = now.toISOString().slice(0, 10);
  const weekday = now.getUTCDay() || 7;
  const monday = addDays(today, 1 - weekday);
  return Array.from({ length: weeks }, (_, i) => addDays(monday, -7 * (weeks - 1 - i)));
}

const WEEK_OF = (column: string) => `DATE_SUB(DATE(${column}), INTERVAL WEEKDAY(${column}) DAY)`;
const day = (v: unknown) => (v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));

/**
 * Coverage over time for every collection that is not archived: per week, the items that existed by the
 * week's end and how many of them had approved text by then (from `approved_at`). An item approved and
 * later reopened counts only once it is approved again (its approval time is what the catalogue keeps).
 */
export async function coverageOverTime(sequelize: Sequelize, opts: { weeks: number; now?: Date }): Promise<{ weeks: string[]; series: CoverageSeries[] }> {
  const weeks = weekStarts(opts.now ?? new Date(), opts.weeks);
  const rows = await sequelize.query<{ collection_id: number; week: Date | string; items: number; approved: number }>(
    `SELECT collection_id, week,
            SUM(SUM(created)) OVER (PARTITION BY collection_id ORDER BY week) AS items,
            SUM(SUM(approved)) OVER (PARTITION BY collection_id ORDER BY week) AS approved
       FROM (
         SELECT collection_id, ${WEEK_OF('created_at')} AS week, COUNT(*) AS created, 0 AS approved FROM items GROUP BY collection_id, week
         UNION ALL
         SELECT collection_id, ${WEEK_OF('approved_at')}, 0, COUNT(*) FROM items
          WHERE state = 'approved' AND approved_at IS NOT NULL GROUP BY collection_id, ${WEEK_OF('approved_at')}
       ) w
      GROUP BY collection_id, week
      ORDER BY collection_id, week`,
    { type: QueryTypes.SELECT },
  );
  const collections = await sequelize.query<{ id: number; name: string }>('SELECT id, name FROM collections WHERE archived_at IS NULL ORDER BY name', { type: QueryTypes.SELECT });
  const byCollection = new Map<number, Array<{ week: string; items: number; approved: number }>>();
  for (const r of rows) {
    const list = byCollection.get(r.collection_id) ?? [];
    list.push({ week: day(r.week), items: Number(r.items), approved: Number(r.approved) });
    byCollection.set(r.collection_id, list);
  }
  const series = collections.map((c) => {
    const cumulative = byCollection.get(c.id) ?? [];
    let k = 0;
    let last = { items: 0, approved: 0 };
    const points = weeks.map((week) => {
      // the running totals of the latest week with any change on or before this one
      while (k < cumulative.length && cumulative[k]!.week <= week) last = cumulative[k++]!;
      return { week, items: last.items, approved: last.approved, coverage: last.items === 0 ? null : last.approved / last.items };
    });
    return { collectionId: c.id, name: c.name, points };
  });
  return { weeks, series };
}

export interface ThroughputRow {
  week: string;
  editorId: number;
  /** items whose text the editor approved that week */
  approved: number;
  /** subject decisions (accepted, rejected, added) the editor made that week */
  decisions: number;
}

/** Review throughput of a collection per week and per editor, over the last `weeks` weeks. */
export async function reviewThroughput(sequelize: Sequelize, collectionId: number, opts: { weeks: number; now?: Date }) {
  const weeks = weekStarts(opts.now ?? new Date(), opts.weeks);
  const from = new Date(`${weeks[0]}T00:00:00Z`);
  const rows = await sequelize.query<{ week: Date | string; user_id: number; name: string; approved: number; decisions: number }>(
    `SELECT a.week, a.user_id, u.display_name AS name, SUM(a.approved) AS approved, SUM(a.decisions) AS decisions
       FROM (
         SELECT ${WEEK_OF('approved_at')} AS week, approved_by AS user_id, 1 AS approved, 0 AS decisions
           FROM items WHERE collection_id = :collectionId AND state = 'approved' AND approved_by IS NOT NULL AND approved_at >= :from
         UNION ALL
         SELECT ${WEEK_OF('g.decided_at')}, g.decided_by, 0, 1
           FROM suggestions g JOIN items i ON i.id = g.item_id
          WHERE i.collection_id = :collectionId AND g.decided_by IS NOT NULL AND g.state <> 'proposed' AND g.decided_at >= :from
       ) a JOIN users u ON u.id = a.user_id
      GROUP BY a.week, a.user_id, u.display_name
      ORDER BY a.week, u.display_name`,
    { type: QueryTypes.SELECT, replacements: { collectionId, from } },
  );
  const editors = new Map<number, string>();
  for (const r of rows) editors.set(r.user_id, r.name);
  return {
    weeks,
    editors: [...editors.entries()].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name)),
    rows: rows.map((r): ThroughputRow => ({ week: day(r.week), editorId: r.user_id, approved: Number(r.approved), decisions: Number(r.decisions) })),
  };
}

/** Suggestion precision per subject over everything decided so far: accepted ÷ (accepted + rejected). */
export async function precisionBySubject(sequelize: Sequelize, collectionId: number) {
  const figures = await subjectFigures(sequelize, collectionId, { from: null, to: null });
  return figures.map((s) => ({
    subjectId: s.subjectId,
    label: s.label,
    kind: s.kind,
    accepted: s.acceptedInPeriod,
    rejected: s.rejectedInPeriod,
    added: s.addedInPeriod,
    waiting: s.waiting,
    precision: precision(s.acceptedInPeriod, s.rejectedInPeriod),
  }));
}

export async function recentRuns(sequelize: Sequelize, collectionId: number, limit = 8) {
  const rows = await sequelize.query<{ id: number; trigger: string; status: string; started_at: Date | null; finished_at: Date | null; created_at: Date; counts: unknown }>(
    'SELECT id, `trigger`, status, started_at, finished_at, created_at, counts FROM runs WHERE collection_id = :collectionId ORDER BY created_at DESC, id DESC LIMIT :limit',
    { type: QueryTypes.SELECT, replacements: { collectionId, limit } },
  );
  return rows.map((r) => {
    const counts = (typeof r.counts === 'string' ? JSON.parse(r.counts) : r.counts) as Record<string, number>;
    return {
      id: r.id,
      trigger: r.trigger,
      status: r.status,
      createdAt: new Date(r.created_at).toISOString(),
      startedAt: r.started_at ? new Date(r.started_at).toISOString() : null,
      finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : null,
      durationMs: r.started_at && r.finished_at ? new Date(r.finished_at).getTime() - new Date(r.started_at).getTime() : null,
      counts: { ingested: counts.ingested ?? 0, embedded: counts.embedded ?? 0, suggested: counts.suggested ?? 0, rejected: counts.rejected ?? 0 },
    };
  });
}

/** Everything the dashboard shows for one collection. */
export async function collectionDashboard(sequelize: Sequelize, collectionId: number, opts: { weeks: number; now?: Date }) {
  const [throughput, precision, agreement, runs] = await Promise.all([
    reviewThroughput(sequelize, collectionId, opts),
    precisionBySubject(sequelize, collectionId),
    collectionAgreement(sequelize, collectionId),
    recentRuns(sequelize, collectionId),
  ]);
  return { throughput, precision, agreement, runs };
}
