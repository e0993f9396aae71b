import { QueryTypes, type Sequelize } from 'sequelize';
import { cohenKappa } from '../ml/metrics.ts';
import type { SecondJudgement } from '../models/review.ts';

/**
 * Agreement between editors on the items a collection reviews twice, blind. For each such item the first
 * editor's judgement of a subject is what the item carries (accepted or added: present; rejected, or left
 * unconfirmed on an approved item: absent), the second editor's is their blind record. The subjects judged on an
 * item are those either editor confirmed or rejected, or the models proposed. Cohen's kappa is computed per
 * subject (over the items where it was judged) and per pair of editors (over all their shared judgements); it is
 * null where it is undefined (fewer than two judgements, or only one category used by both editors).
 */
export async function collectionAgreement(
  sequelize: Sequelize,
  collectionId: number,
): Promise<{
  perSubject: Array<{ subjectId: number; label: string; items: number; kappa: number | null }>;
  perPair: Array<{ editorA: { id: number; name: string }; editorB: { id: number; name: string }; items: number; kappa: number | null }>;
}> {
  const reviews = await sequelize.query<{ item_id: number; reviewer_id: number | null; first_reviewer_id: number | null; judgements: unknown }>(
    `SELECT r.item_id, r.reviewer_id, r.first_reviewer_id, r.judgements FROM second_reviews r JOIN items i ON i.id = r.item_id
      WHERE i.collection_id = :collectionId ORDER BY r.item_id`,
    { type: QueryTypes.SELECT, replacements: { collectionId } },
  );
  if (reviews.length === 0) return { perSubject: [], perPair: [] };
  const itemIds = reviews.map((r) => Number(r.item_id));
  const firsts = await sequelize.query<{ item_id: number; subject_id: number; state: string }>(
    'SELECT item_id, subject_id, state FROM suggestions WHERE item_id IN (:itemIds)',
    { type: QueryTypes.SELECT, replacements: { itemIds } },
  );
  const firstOf = new Map<number, Map<number, boolean>>();
  for (const f of firsts) {
    const m = firstOf.get(Number(f.item_id)) ?? new Map<number, boolean>();
    m.set(Number(f.subject_id), f.state === 'accepted' || f.state === 'added');
    firstOf.set(Number(f.item_id), m);
  }
  const labels = new Map(
    (await sequelize.query<{ id: number; pref_label: string }>('SELECT id, pref_label FROM subjects WHERE collection_id = :collectionId', { type: QueryTypes.SELECT, replacements: { collectionId } })).map((s) => [Number(s.id), s.pref_label]),
  );

  const bySubject = new Map<number, { a: number[]; b: number[] }>();
  const byPair = new Map<string, { ids: [number, number]; a: number[]; b: number[]; items: Set<number> }>();
  for (const r of reviews) {
    const itemId = Number(r.item_id);
    const raw = typeof r.judgements === 'string' ? JSON.parse(r.judgements) : r.judgements;
    const second = new Map((raw as SecondJudgement[]).map((j) => [Number(j.subjectId), Boolean(j.present)]));
    const first = firstOf.get(itemId) ?? new Map<number, boolean>();
    const judged = new Set([...first.keys(), ...second.keys()]);
    const pairKnown = r.reviewer_id !== null && r.first_reviewer_id !== null;
    const [lo, hi] = pairKnown ? [Number(r.first_reviewer_id), Number(r.reviewer_id)].sort((x, y) => x - y) : [0, 0];
    const swap = pairKnown && lo !== Number(r.first_reviewer_id);
    for (const subjectId of judged) {
      if (!labels.has(subjectId)) continue;
      const a = first.get(subjectId) ? 1 : 0;
      const b = second.get(subjectId) ? 1 : 0;
      const s = bySubject.get(subjectId) ?? { a: [], b: [] };
      s.a.push(a);
      s.b.push(b);
      bySubject.set(subjectId, s);
      if (pairKnown && lo !== hi) {
        const key = `${lo}:${hi}`;
        const p = byPair.get(key) ?? { ids: [lo!, hi!], a: [], b: [], items: new Set<number>() };
        // the pair's columns keep one editor each, whichever of them reviewed first
        p.a.push(swap ? b : a);
        p.b.push(swap ? a : b);
        p.items.add(itemId);
        byPair.set(key, p);
      }
    }
  }
  const people = new Map(
    (await sequelize.query<{ id: number; display_name: string }>('SELECT id, display_name FROM users WHERE id IN (:ids)', {
      type: QueryTypes.SELECT,
      replacements: { ids: [...new Set([...byPair.values()].flatMap((p) => p.ids)), 0] },
    })).map((u) => [Number(u.id), u.display_name]),
  );
  // kappa needs at least two judgements and two categories in use: with one, chance agreement is total and
  // kappa undefined (the textbook 0/0), so the figure is left out rather than shown as a perfect 1
  const kappaOf = (a: number[], b: number[]) => (a.length < 2 || new Set([...a, ...b]).size < 2 ? null : cohenKappa(a, b));
  return {
    perSubject: [...bySubject.entries()]
      .map(([subjectId, s]) => ({ subjectId, label: labels.get(subjectId)!, items: s.a.length, kappa: kappaOf(s.a, s.b) }))
      .sort((x, y) => x.label.localeCompare(y.label)),
    perPair: [...byPair.values()]
      .map((p) => ({
        editorA: { id: p.ids[0], name: people.get(p.ids[0]) ?? `person ${p.ids[0]}` },
        editorB: { id: p.ids[1], name: people.get(p.ids[1]) ?? `person ${p.ids[1]}` },
        items: p.items.size,
        kappa: kappaOf(p.a, p.b),
      }))
      .sort((x, y) => x.editorA.name.localeCompare(y.editorA.name) || x.editorB.name.localeCompare(y.editorB.name)),
  };
}
