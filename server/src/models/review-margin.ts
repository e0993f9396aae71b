import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';

/**
 * `items.review_margin`: the item's smallest |probability − 0.5| over its open, calibrated proposals (NULL when
 * it has none), which the review queue sorts by. Kept current by the suggestion model's hooks (every create,
 * update and destroy of one suggestion, and bulk creates) and, for the suggest stage's own SQL, by one pass
 * over the collection at its end. A bulk destroy or a cascade leaves it to the next pass: it only orders the
 * queue, and the queue reads each listed item's proposals afresh.
 */
const MARGIN = `(SELECT MIN(ABS(h.probability - 0.5)) FROM suggestions h WHERE h.item_id = i.id AND h.state = 'proposed' AND h.probability IS NOT NULL)`;

/** Recomputes the margin of these items (inside the caller's transaction, if any). */
export async function refreshReviewMargins(sequelize: Sequelize, itemIds: readonly number[], transaction?: Transaction | null): Promise<void> {
  const ids = [...new Set(itemIds)];
  if (ids.length === 0) return;
  await sequelize.query(`UPDATE items i SET i.review_margin = ${MARGIN} WHERE i.id IN (:ids)`, { replacements: { ids }, transaction: transaction ?? undefined, type: QueryTypes.UPDATE });
}

/** Recomputes the margin of every item of a collection whose stored margin is out of date. */
export async function refreshCollectionReviewMargins(sequelize: Sequelize, collectionId: number, transaction?: Transaction | null): Promise<void> {
  await sequelize.query(`UPDATE items i SET i.review_margin = ${MARGIN} WHERE i.collection_id = :collectionId AND NOT (i.review_margin <=> ${MARGIN})`, {
    replacements: { collectionId },
    transaction: transaction ?? undefined,
    type: QueryTypes.UPDATE,
  });
}
