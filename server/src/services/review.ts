import { Op, QueryTypes, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import { checkAltText, composeDraft, hasErrors, type Finding } from '../../../common/alt-text/index.ts';

export type { GridEntry, ItemPanel, PanelSubject, PanelSuggestion, QueueEntry, SubjectMatch } from '../../../common/review/types.ts';
import { HttpProblem } from '../http/problem.ts';
import { Collection, Example, Item, ItemTextRead, SecondReview, Subject, SubjectModel, Suggestion, User } from '../models/index.ts';
import type { SecondJudgement } from '../models/review.ts';
import type { SuggestionState } from '../models/suggestion.ts';
import type { GridEntry, ItemPanel, PanelSubject, PanelSuggestion, QueueEntry, SubjectMatch } from '../../../common/review/types.ts';
import { audit, type AuditAction } from './audit.ts';
import { itemOr404, syncSearchText } from './catalogue.ts';
import { embedStoredFile, processEmbedder } from './features.ts';
import type { Storage } from './storage.ts';

/**
 * The review desk: the item queue, the subject grid, the item panel, and every decision an editor makes there.
 *
 * Every change to an item's review (its subjects, form, texts, caption flag, approval) is checked against the
 * item version the editor's copy was made from and bumps it, in one transaction with its audit event: an editor
 * working from a stale copy gets a StaleItemError (HTTP 409) carrying what they sent and the item as it is now,
 * and nothing of theirs is thrown away.
 */

export interface Actor {
  id: number;
  ip?: string | null;
}

// ------------------------------------------------------------------ the panel




const CONFIRMED: readonly SuggestionState[] = ['accepted', 'added'];

async function vocabulary(collectionId: number, transaction?: Transaction): Promise<Map<number, Subject>> {
  const subjects = await Subject.findAll({ where: { collectionId }, transaction });
  return new Map(subjects.map((s) => [s.id, s]));
}

function panelSubject(s: Subject, vocab: Map<number, Subject>): PanelSubject {
  const broader: PanelSubject['broader'] = [];
  const seen = new Set<number>([s.id]);
  for (let b = s.broaderId ? vocab.get(s.broaderId) : undefined; b && !seen.has(b.id); b = b.broaderId ? vocab.get(b.broaderId) : undefined) {
    seen.add(b.id);
    broader.push({ id: b.id, prefLabel: b.prefLabel });
  }
  return {
    id: s.id,
    prefLabel: s.prefLabel,
    altLabels: Array.isArray(s.altLabels) ? s.altLabels : [],
    kind: s.kind,
    altTextPhrase: s.altTextPhrase,
    feedsAltText: s.feedsAltText,
    broaderId: s.broaderId,
    broader,
  };
}

/** Which items a collection reviews twice: a fixed pseudo-random share, the same on every server. */
const SAMPLE_SQL = "MOD(CRC32(CONCAT('second-review:', i.id)), 1000) < ROUND(:share * 1000)";

export async function doubleReviewShare(collectionId: number, transaction?: Transaction): Promise<number> {
  const rows = await Item.sequelize!.query<{ share: string }>('SELECT double_review_share AS share FROM review_settings WHERE collection_id = :collectionId', {
    type: QueryTypes.SELECT,
    replacements: { collectionId },
    transaction,
  });
  return rows[0] ? Number(rows[0].share) : DEFAULT_DOUBLE_REVIEW_SHARE;
}
export const DEFAULT_DOUBLE_REVIEW_SHARE = 0.1;

async function inSample(itemId: number, share: number, transaction?: Transaction): Promise<boolean> {
  const rows = await Item.sequelize!.query<{ hit: number }>(`SELECT ${SAMPLE_SQL} AS hit FROM items i WHERE i.id = :itemId`, {
    type: QueryTypes.SELECT,
    replacements: { itemId, share },
    transaction,
  });
  return Boolean(Number(rows[0]?.hit ?? 0));
}

export async function itemPanel(itemId: number, viewer: Actor, opts: { blind?: boolean; transaction?: Transaction } = {}): Promise<ItemPanel> {
  const { transaction } = opts;
  const item = await itemOr404(itemId, undefined);
  const vocab = await vocabulary(item.collectionId, transaction);
  const rows = await Suggestion.findAll({ where: { itemId }, transaction });
  const models = new Map(
    (await SubjectModel.findAll({ where: { id: rows.map((r) => r.subjectModelId).filter((x): x is number => x !== null) }, attributes: ['id', 'version', 'method'], transaction })).map((m) => [m.id, m]),
  );
  const peopleIds = [...new Set([...rows.map((r) => r.decidedBy), item.approvedBy].filter((x): x is number => x !== null))];
  const people = new Map((await User.findAll({ where: { id: peopleIds }, attributes: ['id', 'displayName'], transaction })).map((u) => [u.id, u.displayName]));
  const who = (id: number | null) => (id ? { id, name: people.get(id) ?? `person ${id}` } : null);

  const share = await doubleReviewShare(item.collectionId, transaction);
  const sampled = await inSample(item.id, share, transaction);
  const second = sampled ? await SecondReview.findOne({ where: { itemId }, transaction }) : null;
  let status: ItemPanel['secondReview']['status'] = 'not-in-sample';
  if (sampled) {
    if (second) status = 'done';
    else if (item.state !== 'approved') status = 'after-approval';
    else if (item.approvedBy === viewer.id) status = 'first-reviewer';
    else status = 'open';
  }
  const blind = Boolean(opts.blind) && status === 'open';

  const suggestions: PanelSuggestion[] = rows
    .filter((r) => vocab.has(r.subjectId))
    .map((r) => {
      const m = r.subjectModelId ? models.get(r.subjectModelId) : undefined;
      return {
        id: r.id,
        subject: panelSubject(vocab.get(r.subjectId)!, vocab),
        state: blind ? null : r.state,
        probability: r.probability,
        score: r.score,
        model: m ? { id: m.id, version: m.version, method: m.method } : null,
        decidedBy: blind ? null : who(r.decidedBy),
        decidedAt: blind || !r.decidedAt ? null : r.decidedAt.toISOString(),
      };
    })
    // on a blind review only what the machine proposed is shown, never what the first editor added
    .filter((s) => !blind || s.model !== null)
    .sort((a, b) => (b.probability ?? -1) - (a.probability ?? -1) || (b.score ?? -Infinity) - (a.score ?? -Infinity) || a.subject.prefLabel.localeCompare(b.subject.prefLabel));

  const confirmed = rows.filter((r) => CONFIRMED.includes(r.state) && vocab.has(r.subjectId)).map((r) => vocab.get(r.subjectId)!);
  const form = confirmed.find((s) => s.kind === 'form') ?? null;
  const read = await ItemTextRead.findByPk(itemId, { transaction });
  const draft = composeDraft({
    form: form ? { prefLabel: form.prefLabel, altTextPhrase: form.altTextPhrase } : null,
    subjects: confirmed.filter((s) => s.kind === 'subject').map((s) => ({ id: s.id, prefLabel: s.prefLabel, altTextPhrase: s.altTextPhrase, broaderId: s.broaderId, feedsAltText: s.feedsAltText })),
    caption: item.caption,
    captionFlagged: item.captionFlagged,
    ocrText: item.ocrText,
  });
  const findings = item.state === 'approved' || item.altText !== null || item.decorative ? checkAltText(checkInput(item, item.altText ?? '', item.longDescription, item.decorative)) : [];
  return {
    item: {
      id: item.id,
      collectionId: item.collectionId,
      identifier: item.identifier,
      fileName: item.fileName,
      caption: item.caption,
      creator: item.creator,
      dateText: item.dateText,
      rights: item.rights,
      width: item.width,
      height: item.height,
      state: blind ? 'suggested' : item.state,
      altText: blind ? null : item.altText,
      longDescription: blind ? null : item.longDescription,
      decorative: blind ? false : item.decorative,
      captionFlagged: item.captionFlagged,
      captionFlagNote: item.captionFlagNote,
      approvedBy: blind ? null : who(item.approvedBy),
      approvedAt: blind || !item.approvedAt ? null : item.approvedAt.toISOString(),
      version: item.version,
      imageUrl: `/api/items/${item.id}/view`,
      thumbUrl: `/api/items/${item.id}/thumbnail`,
    },
    ocr: read ? { text: read.text, confidence: read.confidence, mostlyText: read.mostlyText, readAt: read.readAt.toISOString(), engine: read.engine } : null,
    subjects: suggestions.filter((s) => s.subject.kind === 'subject'),
    forms: suggestions.filter((s) => s.subject.kind === 'form'),
    acceptedForm: blind || !form ? null : panelSubject(form, vocab),
    draft: blind ? '' : draft,
    findings: blind ? [] : findings,
    secondReview: { inSample: sampled, status, blind },
  };
}

function checkInput(item: Item, altText: string, longDescription: string | null, decorative: boolean) {
  return { altText, longDescription, decorative, fileName: item.fileName, identifier: item.identifier, caption: item.caption, ocrText: item.ocrText };
}

// ------------------------------------------------------------------ optimistic locking

/** A save made from an older copy of the item: what the editor sent, and the item as it is now. */
export class StaleItemError extends Error {
  constructor(
    readonly itemId: number,
    readonly submittedVersion: number,
    readonly submitted: Record<string, unknown>,
    readonly current: ItemPanel,
  ) {
    super(`item ${itemId} changed since version ${submittedVersion}`);
  }
}

/** Several stale items in one grid save. */
export class StaleBatchError extends Error {
  constructor(readonly stale: Array<{ itemId: number; submittedVersion: number; currentVersion: number; identifier: string }>) {
    super(`${stale.length} item(s) changed meanwhile`);
  }
}

/**
 * Runs one change to an item in a transaction: locks the row, checks the editor's version, applies the change,
 * bumps the version (Sequelize's optimistic lock adds `WHERE version = …`) and rebuilds its search text.
 */
async function changeItem<T>(
  sequelize: Sequelize,
  itemId: number,
  version: number,
  actor: Actor,
  submitted: Record<string, unknown>,
  change: (item: Item, transaction: Transaction) => Promise<T>,
): Promise<{ result: T; panel: ItemPanel }> {
  let stale = false;
  const result = await sequelize.transaction(async (transaction) => {
    const item = await itemOr404(itemId, transaction);
    if (item.version !== version) {
      stale = true;
      return null;
    }
    const r = await change(item, transaction);
    item.changed('updatedAt', true);
    await item.save({ transaction });
    await syncSearchText(sequelize, [item.id], transaction);
    return r;
  });
  const panel = await itemPanel(itemId, actor);
  if (stale) throw new StaleItemError(itemId, version, submitted, panel);
  return { result: result as T, panel };
}

// ------------------------------------------------------------------ decisions on subjects

export type SubjectDecision = 'accept' | 'reject' | 'undo';

async function subjectOf(collectionId: number, subjectId: number, transaction: Transaction): Promise<Subject> {
  const subject = await Subject.findByPk(subjectId, { transaction });
  if (!subject || subject.collectionId !== collectionId) throw new HttpProblem(422, 'Unknown subject', `Subject ${subjectId} is not in this item's collection.`, { type: '/problems/unknown-subject' });
  if (subject.status === 'retired') throw new HttpProblem(422, 'Retired subject', `“${subject.prefLabel}” is retired and can no longer be given to items.`, { type: '/problems/retired-subject' });
  return subject;
}

async function modelVersion(id: number | null, transaction: Transaction): Promise<number | null> {
  if (!id) return null;
  return (await SubjectModel.findByPk(id, { attributes: ['id', 'version'], transaction }))?.version ?? null;
}

/** One decision on one (item, subject) inside the item's transaction; records it and its audit event. */
async function applyDecision(item: Item, subject: Subject, decision: SubjectDecision, actor: Actor, transaction: Transaction): Promise<void> {
  const row = await Suggestion.findOne({ where: { itemId: item.id, subjectId: subject.id }, transaction, lock: transaction.LOCK.UPDATE });
  const from = row?.state ?? null;
  const now = new Date();
  let to: SuggestionState | null;
  // a row the night shift made keeps saying so: accepted (not added), and back to proposed when undone
  const fromMachine = row !== null && (row.state === 'proposed' || row.state === 'accepted' || row.subjectModelId !== null || row.runId !== null || row.score !== null);
  if (decision === 'accept') to = fromMachine ? 'accepted' : 'added';
  else if (decision === 'reject') to = 'rejected';
  else to = fromMachine ? 'proposed' : null;
  if (from === to) return;

  if (row && to === null) await row.destroy({ transaction });
  else if (row && to) await row.update({ state: to, decidedBy: to === 'proposed' ? null : actor.id, decidedAt: to === 'proposed' ? null : now }, { transaction });
  else if (to) await Suggestion.create({ itemId: item.id, subjectId: subject.id, subjectModelId: null, runId: null, score: null, probability: null, state: to, decidedBy: actor.id, decidedAt: now }, { transaction });

  // an item has one form: confirming one sets any other confirmed form aside
  if (subject.kind === 'form' && (to === 'accepted' || to === 'added')) {
    const others = await Suggestion.findAll({ where: { itemId: item.id, subjectId: { [Op.ne]: subject.id }, state: { [Op.in]: CONFIRMED as SuggestionState[] } }, include: [{ model: Subject, as: 'subject', where: { kind: 'form' } }], transaction });
    for (const o of others) {
      await o.update({ state: 'rejected', decidedBy: actor.id, decidedAt: now }, { transaction });
      await audit({ action: 'review-subject-rejected', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: item.id, detail: { subjectId: o.subjectId, subjectLabel: (o as unknown as { subject: Subject }).subject.prefLabel, from: o.state, to: 'rejected', because: 'another form was set', subjectModelId: o.subjectModelId, modelVersion: await modelVersion(o.subjectModelId, transaction) } }, transaction);
    }
  }
  const action: AuditAction = to === 'added' ? 'review-subject-added' : to === 'accepted' ? 'review-subject-accepted' : to === 'rejected' ? 'review-subject-rejected' : 'review-subject-undone';
  await audit(
    {
      action,
      actorId: actor.id,
      ip: actor.ip,
      targetType: 'item',
      targetId: item.id,
      detail: { subjectId: subject.id, subjectLabel: subject.prefLabel, kind: subject.kind, from, to, subjectModelId: row?.subjectModelId ?? null, modelVersion: await modelVersion(row?.subjectModelId ?? null, transaction), probability: row?.probability ?? null },
    },
    transaction,
  );
}

export async function decideSubject(sequelize: Sequelize, actor: Actor, itemId: number, input: { version: number; subjectId: number; decision: SubjectDecision }): Promise<ItemPanel> {
  const { panel } = await changeItem(sequelize, itemId, input.version, actor, { ...input }, async (item, transaction) => {
    const subject = await subjectOf(item.collectionId, input.subjectId, transaction);
    await applyDecision(item, subject, input.decision, actor, transaction);
  });
  return panel;
}

/** Sets the item's form (or clears it with null). */
export async function setForm(sequelize: Sequelize, actor: Actor, itemId: number, input: { version: number; subjectId: number | null }): Promise<ItemPanel> {
  const { panel } = await changeItem(sequelize, itemId, input.version, actor, { ...input }, async (item, transaction) => {
    if (input.subjectId === null) {
      const confirmed = await Suggestion.findAll({ where: { itemId: item.id, state: { [Op.in]: CONFIRMED as SuggestionState[] } }, include: [{ model: Subject, as: 'subject', where: { kind: 'form' } }], transaction });
      for (const c of confirmed) await applyDecision(item, (c as unknown as { subject: Subject }).subject, 'reject', actor, transaction);
      return;
    }
    const subject = await subjectOf(item.collectionId, input.subjectId, transaction);
    if (subject.kind !== 'form') throw new HttpProblem(422, 'Not a form', `“${subject.prefLabel}” is a subject, not a form.`, { type: '/problems/not-a-form' });
    await applyDecision(item, subject, 'accept', actor, transaction);
  });
  return panel;
}

// ------------------------------------------------------------------ texts, approval, flags, skips

export interface DescriptionInput {
  version: number;
  altText: string;
  longDescription: string;
  decorative: boolean;
}

/** Saves the alt text, long description and decorative flag without approving (a draft on the server). */
export async function saveDescription(sequelize: Sequelize, actor: Actor, itemId: number, input: DescriptionInput): Promise<ItemPanel> {
  const { panel } = await changeItem(sequelize, itemId, input.version, actor, { ...input }, async (item, transaction) => {
    item.set({ altText: input.altText, longDescription: input.longDescription.trim() ? input.longDescription : null, decorative: input.decorative });
    await audit({ action: 'review-description-saved', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: item.id, detail: { altTextLength: input.altText.length, decorative: input.decorative } }, transaction);
  });
  return panel;
}

/** The alt text fails the checker: errors block approval (warnings never do). */
export class AltTextRejected extends HttpProblem {
  constructor(readonly findings: Finding[]) {
    super(422, 'Alt text not ready', 'The alt text has problems that block approval; warnings alone never do.', {
      type: '/problems/alt-text-not-ready',
      errors: findings.filter((f) => f.severity === 'error').map((f) => ({ path: f.ruleId === 'decorative-not-empty' ? 'decorative' : 'altText', message: f.message })),
    });
  }
}

/**
 * Approves the item with these texts: the checker runs again here, errors block; every suggestion still
 * only proposed is recorded as rejected by this editor (approving says these are the item's subjects).
 */
export async function approveItem(sequelize: Sequelize, actor: Actor, itemId: number, input: DescriptionInput): Promise<{ panel: ItemPanel; warnings: Finding[]; rejected: number }> {
  const { result, panel } = await changeItem(sequelize, itemId, input.version, actor, { ...input }, async (item, transaction) => {
    const altText = input.decorative ? input.altText : input.altText.trim();
    const findings = checkAltText(checkInput(item, altText, input.longDescription, input.decorative));
    if (hasErrors(findings)) throw new AltTextRejected(findings);
    const now = new Date();
    const open = await Suggestion.findAll({ where: { itemId: item.id, state: 'proposed' }, include: [{ model: Subject, as: 'subject' }], transaction, lock: transaction.LOCK.UPDATE });
    for (const s of open) {
      await s.update({ state: 'rejected', decidedBy: actor.id, decidedAt: now }, { transaction });
      await audit({ action: 'review-subject-rejected', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: item.id, detail: { subjectId: s.subjectId, subjectLabel: (s as unknown as { subject: Subject }).subject.prefLabel, from: 'proposed', to: 'rejected', because: 'not accepted when the item was approved', subjectModelId: s.subjectModelId, modelVersion: await modelVersion(s.subjectModelId, transaction), probability: s.probability } }, transaction);
    }
    item.set({ altText: altText, longDescription: input.longDescription.trim() ? input.longDescription.trim() : null, decorative: input.decorative, state: 'approved', approvedBy: actor.id, approvedAt: now });
    await sequelize.query('DELETE FROM review_skips WHERE item_id = :itemId', { replacements: { itemId: item.id }, transaction });
    const warnings = findings.filter((f) => f.severity === 'warning');
    await audit({ action: 'review-item-approved', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: item.id, detail: { decorative: input.decorative, altTextLength: altText.length, warnings: warnings.map((w) => w.ruleId), rejectedProposals: open.length } }, transaction);
    return { warnings, rejected: open.length };
  });
  return { panel, ...result };
}

export async function flagCaption(sequelize: Sequelize, actor: Actor, itemId: number, input: { version: number; flagged: boolean; note: string }): Promise<ItemPanel> {
  const { panel } = await changeItem(sequelize, itemId, input.version, actor, { ...input }, async (item, transaction) => {
    item.set({ captionFlagged: input.flagged, captionFlagNote: input.flagged ? input.note.trim() : null });
    await audit({ action: input.flagged ? 'review-caption-flagged' : 'review-caption-unflagged', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: item.id, detail: input.flagged ? { note: input.note.trim() } : {} }, transaction);
  });
  return panel;
}

/** Skipping sends the item to the end of this editor's queue; nothing about the item changes. */
export async function skipItem(sequelize: Sequelize, actor: Actor, itemId: number): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await itemOr404(itemId, transaction);
    await sequelize.query('INSERT INTO review_skips (item_id, user_id, skipped_at) VALUES (:itemId, :userId, NOW(3)) ON DUPLICATE KEY UPDATE skipped_at = NOW(3)', { replacements: { itemId, userId: actor.id }, transaction });
    await audit({ action: 'review-item-skipped', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: itemId }, transaction);
  });
}

/**
 * Makes the item's scan an example (medium photo) of a subject the item has been confirmed to show, and embeds
 * it; promoting the same item to the same subject again returns the example it already is.
 */
export async function promoteToExample(sequelize: Sequelize, storage: Storage, actor: Actor, itemId: number, subjectId: number): Promise<{ exampleId: number; created: boolean }> {
  const item = await itemOr404(itemId);
  const confirmed = await Suggestion.findOne({ where: { itemId, subjectId, state: { [Op.in]: CONFIRMED as SuggestionState[] } } });
  const subject = await Subject.findByPk(subjectId);
  if (!subject || subject.collectionId !== item.collectionId) throw new HttpProblem(422, 'Unknown subject', `Subject ${subjectId} is not in this item's collection.`, { type: '/problems/unknown-subject' });
  if (!confirmed) throw new HttpProblem(409, 'Subject not confirmed', `Accept or add “${subject.prefLabel}” on ${item.identifier} before making it an example of that subject.`, { type: '/problems/subject-not-confirmed' });
  const existing = await Example.findOne({ where: { subjectId, itemId } });
  if (existing) return { exampleId: existing.id, created: false };
  const fileKey = item.fileKey && (await storage.has(item.fileKey)) ? item.fileKey : item.viewKey;
  if (!fileKey || !(await storage.has(fileKey))) throw new HttpProblem(422, 'No image', `${item.identifier} has no stored scan to make an example from.`, { type: '/problems/no-image' });
  const embedder = await processEmbedder();
  const example = await Example.create({ subjectId, medium: 'photo', origin: 'promoted', fileKey, itemId, createdBy: actor.id });
  try {
    await embedStoredFile(embedder, storage, { type: 'example', id: example.id }, fileKey);
  } catch (err) {
    await example.destroy();
    throw new HttpProblem(422, 'Could not read the scan', `${item.identifier}: ${(err as Error).message}`, { type: '/problems/scan-not-decodable' });
  }
  await audit({ action: 'review-example-promoted', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: itemId, detail: { subjectId, subjectLabel: subject.prefLabel, exampleId: example.id, embedderId: embedder.id } });
  return { exampleId: example.id, created: true };
}

// ------------------------------------------------------------------ the queue

export interface QueueQuery {
  collectionId: number;
  subjectId?: number;
  /** 'open' (default) is every item not yet approved */
  state?: 'open' | 'new' | 'suggested' | 'approved';
  minProbability?: number;
  maxProbability?: number;
  /** only items no editor has decided anything on */
  notReviewed?: boolean;
  sort: 'uncertainty' | 'identifier';
  limit: number;
  offset: number;
}

/**
 * The item-first queue. Uncertainty order puts first the items whose most doubtful proposal has a probability
 * nearest 0.5 (the decision that tells the models most, as in uncertainty sampling), then items whose proposals
 * are not calibrated yet, then items with none; items this editor skipped go to the end.
 */
export async function reviewQueue(sequelize: Sequelize, viewer: Actor, q: QueueQuery): Promise<{ items: QueueEntry[]; total: number }> {
  const where = ['i.collection_id = :collectionId'];
  const rep: Record<string, unknown> = { collectionId: q.collectionId, viewer: viewer.id };
  const state = q.state ?? 'open';
  if (state === 'open') where.push("i.state <> 'approved'");
  else {
    where.push('i.state = :state');
    rep.state = state;
  }
  const subjectCond = q.subjectId ? 'AND h.subject_id = :subjectId' : '';
  if (q.subjectId) {
    rep.subjectId = q.subjectId;
    where.push('EXISTS (SELECT 1 FROM suggestions h WHERE h.item_id = i.id AND h.subject_id = :subjectId)');
  }
  if (q.minProbability !== undefined || q.maxProbability !== undefined) {
    rep.minP = q.minProbability ?? 0;
    rep.maxP = q.maxProbability ?? 1;
    where.push(`EXISTS (SELECT 1 FROM suggestions h WHERE h.item_id = i.id AND h.state = 'proposed' AND h.probability BETWEEN :minP AND :maxP ${subjectCond})`);
  }
  if (q.notReviewed) where.push("i.state <> 'approved' AND NOT EXISTS (SELECT 1 FROM suggestions h WHERE h.item_id = i.id AND h.state <> 'proposed')");
  const clause = where.join(' AND ');
  const total = Number((await sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM items i WHERE ${clause}`, { type: QueryTypes.SELECT, replacements: rep }))[0]?.n ?? 0);
  // the doubt of an item: its stored margin (models/review-margin.ts), or, within one subject, that subject's own
  const margin = q.subjectId
    ? `(SELECT MIN(ABS(h.probability - 0.5)) FROM suggestions h WHERE h.item_id = i.id AND h.state = 'proposed' AND h.probability IS NOT NULL ${subjectCond})`
    : 'i.review_margin';
  // then, among items with no calibrated doubt, those with proposals waiting ('suggested') before those with none
  const order = q.sort === 'identifier' ? 'skipped, identifier' : "skipped, margin IS NULL, margin, state <> 'suggested', identifier";
  // the page is chosen first, on the cheap columns; only its rows then look up their proposals
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT p.*,
            (SELECT COUNT(*) FROM suggestions h WHERE h.item_id = p.id AND h.state = 'proposed') AS proposed,
            (SELECT h.subject_id FROM suggestions h WHERE h.item_id = p.id AND h.state = 'proposed' AND h.probability IS NOT NULL ${subjectCond} ORDER BY ABS(h.probability - 0.5), h.subject_id LIMIT 1) AS doubt_subject
       FROM (SELECT i.id, i.identifier, i.caption, i.state, i.version, ${margin} AS margin,
                    EXISTS (SELECT 1 FROM review_skips k WHERE k.item_id = i.id AND k.user_id = :viewer) AS skipped
               FROM items i WHERE ${clause}
              ORDER BY ${order}
              LIMIT :limit OFFSET :offset) p
      ORDER BY ${order}`,
    { type: QueryTypes.SELECT, replacements: { ...rep, limit: q.limit, offset: q.offset } },
  );
  const doubtIds = rows.map((r) => Number(r.doubt_subject)).filter((x) => x > 0);
  const doubts = doubtIds.length
    ? await Suggestion.findAll({ where: { [Op.or]: rows.filter((r) => r.doubt_subject).map((r) => ({ itemId: Number(r.id), subjectId: Number(r.doubt_subject) })) }, include: [{ model: Subject, as: 'subject', attributes: ['prefLabel'] }] })
    : [];
  const doubtOf = new Map(doubts.map((d) => [d.itemId, d]));
  return {
    total,
    items: rows.map((r) => {
      const d = doubtOf.get(Number(r.id));
      return {
        id: Number(r.id),
        identifier: String(r.identifier),
        caption: (r.caption as string | null) ?? null,
        state: String(r.state),
        version: Number(r.version),
        thumbUrl: `/api/items/${Number(r.id)}/thumbnail`,
        proposed: Number(r.proposed),
        mostUncertain: d && d.probability !== null ? { subjectId: d.subjectId, label: (d as unknown as { subject: Subject }).subject.prefLabel, probability: d.probability } : null,
        skippedByYou: Boolean(Number(r.skipped)),
      };
    }),
  };
}

// ------------------------------------------------------------------ the subject grid


/** The items a subject's model ranks highest among those still waiting for a decision on it. */
export async function subjectGrid(sequelize: Sequelize, subjectId: number, limit: number): Promise<{ subject: PanelSubject; items: GridEntry[]; waiting: number }> {
  const subject = await Subject.findByPk(subjectId);
  if (!subject) throw new HttpProblem(404, 'Not found', 'No such subject.');
  const vocab = await vocabulary(subject.collectionId);
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT i.id, i.identifier, i.caption, i.version, g.probability, g.score, g.subject_model_id, m.version AS model_version
       FROM suggestions g JOIN items i ON i.id = g.item_id LEFT JOIN subject_models m ON m.id = g.subject_model_id
      WHERE g.subject_id = :subjectId AND g.state = 'proposed' AND i.state <> 'approved'
      ORDER BY g.score DESC, i.identifier LIMIT :limit`,
    { type: QueryTypes.SELECT, replacements: { subjectId, limit } },
  );
  const waiting = Number((await sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM suggestions g JOIN items i ON i.id = g.item_id WHERE g.subject_id = :subjectId AND g.state = 'proposed' AND i.state <> 'approved'", { type: QueryTypes.SELECT, replacements: { subjectId } }))[0]?.n ?? 0);
  return {
    subject: panelSubject(subject, vocab),
    waiting,
    items: rows.map((r) => ({
      itemId: Number(r.id),
      identifier: String(r.identifier),
      caption: (r.caption as string | null) ?? null,
      version: Number(r.version),
      thumbUrl: `/api/items/${Number(r.id)}/thumbnail`,
      probability: r.probability === null ? null : Number(r.probability),
      score: r.score === null ? null : Number(r.score),
      model: r.subject_model_id ? { id: Number(r.subject_model_id), version: Number(r.model_version) } : null,
    })),
  };
}

/** Confirms or rejects one subject on many items at once: all of them land, or (one stale item) none. */
export async function decideMany(sequelize: Sequelize, actor: Actor, subjectId: number, decisions: Array<{ itemId: number; version: number; decision: 'accept' | 'reject' }>): Promise<{ decided: number }> {
  await sequelize.transaction(async (transaction) => {
    const subject = await Subject.findByPk(subjectId, { transaction });
    if (!subject) throw new HttpProblem(404, 'Not found', 'No such subject.');
    const items = await Item.findAll({ where: { id: decisions.map((d) => d.itemId) }, transaction, lock: transaction.LOCK.UPDATE, order: [['id', 'ASC']] });
    const byId = new Map(items.map((i) => [i.id, i]));
    const missing = decisions.filter((d) => !byId.has(d.itemId)).map((d) => d.itemId);
    if (missing.length) throw new HttpProblem(404, 'Not found', `No item ${missing.join(', ')}.`);
    const wrong = items.filter((i) => i.collectionId !== subject.collectionId).map((i) => i.identifier);
    if (wrong.length) throw new HttpProblem(422, 'Unknown subject', `“${subject.prefLabel}” is not in the collection of ${wrong.join(', ')}.`, { type: '/problems/unknown-subject' });
    const stale = decisions.filter((d) => byId.get(d.itemId)!.version !== d.version).map((d) => ({ itemId: d.itemId, submittedVersion: d.version, currentVersion: byId.get(d.itemId)!.version, identifier: byId.get(d.itemId)!.identifier }));
    if (stale.length) throw new StaleBatchError(stale);
    for (const d of decisions) {
      const item = byId.get(d.itemId)!;
      await applyDecision(item, subject, d.decision, actor, transaction);
      item.changed('updatedAt', true);
      await item.save({ transaction });
    }
    await syncSearchText(sequelize, decisions.map((d) => d.itemId), transaction);
  });
  return { decided: decisions.length };
}

// ------------------------------------------------------------------ vocabulary typeahead


/** Subjects of a collection whose preferred or alternative label contains the words typed, best first. */
export async function searchSubjects(collectionId: number, text: string, opts: { kind?: 'subject' | 'form'; limit: number }): Promise<SubjectMatch[]> {
  const vocab = await vocabulary(collectionId);
  const needle = text.trim().toLowerCase();
  const scored: Array<{ s: Subject; rank: number; alt: string | null }> = [];
  for (const s of vocab.values()) {
    if (s.status !== 'active' || (opts.kind && s.kind !== opts.kind)) continue;
    const pref = s.prefLabel.toLowerCase();
    const alts = (Array.isArray(s.altLabels) ? s.altLabels : []).map(String);
    let rank = -1;
    let alt: string | null = null;
    if (!needle) rank = 5;
    else if (pref === needle) rank = 0;
    else if (pref.startsWith(needle)) rank = 1;
    else if (pref.split(/\s+/).some((w) => w.startsWith(needle))) rank = 2;
    else {
      const a = alts.find((l) => l.toLowerCase().startsWith(needle)) ?? alts.find((l) => l.toLowerCase().includes(needle));
      if (a) {
        rank = a.toLowerCase().startsWith(needle) ? 3 : 4;
        alt = a;
      } else if (pref.includes(needle)) rank = 4;
    }
    if (rank >= 0) scored.push({ s, rank, alt });
  }
  scored.sort((a, b) => a.rank - b.rank || a.s.prefLabel.localeCompare(b.s.prefLabel));
  return scored.slice(0, opts.limit).map(({ s, alt }) => ({ ...panelSubject(s, vocab), matchedAltLabel: alt }));
}

// ------------------------------------------------------------------ double review

export async function setDoubleReviewShare(sequelize: Sequelize, actor: Actor, collectionId: number, share: number): Promise<number> {
  if (!(await Collection.findByPk(collectionId))) throw new HttpProblem(404, 'Not found', 'No such collection.');
  await sequelize.transaction(async (transaction) => {
    const before = await doubleReviewShare(collectionId, transaction);
    await sequelize.query(
      'INSERT INTO review_settings (collection_id, double_review_share, updated_by, updated_at) VALUES (:collectionId, :share, :actor, NOW(3)) ON DUPLICATE KEY UPDATE double_review_share = VALUES(double_review_share), updated_by = VALUES(updated_by), updated_at = NOW(3)',
      { replacements: { collectionId, share, actor: actor.id }, transaction },
    );
    await audit({ action: 'review-settings-changed', actorId: actor.id, ip: actor.ip, targetType: 'collection', targetId: collectionId, detail: { doubleReviewShare: { from: before, to: share } } }, transaction);
  });
  return share;
}

/** The approved items of a collection's double-review share (whoever approved them, reviewed twice or not). */
export async function approvedInSample(sequelize: Sequelize, collectionId: number): Promise<Array<{ id: number; identifier: string; approvedBy: number | null }>> {
  const share = await doubleReviewShare(collectionId);
  const rows = await sequelize.query<{ id: number; identifier: string; approved_by: number | null }>(
    `SELECT i.id, i.identifier, i.approved_by FROM items i WHERE i.collection_id = :collectionId AND i.state = 'approved' AND ${SAMPLE_SQL} ORDER BY i.id`,
    { type: QueryTypes.SELECT, replacements: { collectionId, share } },
  );
  return rows.map((r) => ({ id: Number(r.id), identifier: r.identifier, approvedBy: r.approved_by === null ? null : Number(r.approved_by) }));
}

/** Approved items of the double-review share that this editor did not approve and nobody has reviewed twice. */
export async function secondReviewQueue(sequelize: Sequelize, viewer: Actor, collectionId: number, limit: number): Promise<{ items: Array<{ id: number; identifier: string; thumbUrl: string }>; total: number; share: number }> {
  const share = await doubleReviewShare(collectionId);
  const where = `i.collection_id = :collectionId AND i.state = 'approved' AND (i.approved_by IS NULL OR i.approved_by <> :viewer) AND ${SAMPLE_SQL}
      AND NOT EXISTS (SELECT 1 FROM second_reviews r WHERE r.item_id = i.id)`;
  const rep = { collectionId, viewer: viewer.id, share, limit };
  const total = Number((await sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM items i WHERE ${where}`, { type: QueryTypes.SELECT, replacements: rep }))[0]?.n ?? 0);
  const rows = await sequelize.query<{ id: number; identifier: string }>(`SELECT i.id, i.identifier FROM items i WHERE ${where} ORDER BY i.identifier LIMIT :limit`, { type: QueryTypes.SELECT, replacements: rep });
  return { total, share, items: rows.map((r) => ({ id: Number(r.id), identifier: r.identifier, thumbUrl: `/api/items/${Number(r.id)}/thumbnail` })) };
}

/**
 * Records a blind second review: the subjects (and form) the second editor judged present among those the
 * models proposed, plus any they added. It changes nothing on the item; agreement is computed from it.
 */
export async function recordSecondReview(sequelize: Sequelize, actor: Actor, itemId: number, input: { present: number[]; absent: number[] }): Promise<{ id: number }> {
  const overlap = input.present.filter((id) => input.absent.includes(id));
  if (overlap.length) throw new HttpProblem(400, 'Invalid request', `Subject ${overlap.join(', ')} is both present and absent.`, { type: '/problems/invalid-request' });
  return sequelize.transaction(async (transaction) => {
    const item = await itemOr404(itemId, transaction);
    const share = await doubleReviewShare(item.collectionId, transaction);
    if (!(await inSample(item.id, share, transaction))) throw new HttpProblem(409, 'Not in the double-review share', `${item.identifier} is not among the items this collection reviews twice.`, { type: '/problems/not-double-reviewed' });
    if (item.state !== 'approved') throw new HttpProblem(409, 'Not approved yet', `${item.identifier} is reviewed a second time only after its first approval.`, { type: '/problems/not-approved-yet' });
    if (item.approvedBy === actor.id) throw new HttpProblem(409, 'Same editor', 'A second review must come from another editor than the one who approved the item.', { type: '/problems/same-editor' });
    const vocab = await vocabulary(item.collectionId, transaction);
    const unknown = [...input.present, ...input.absent].filter((id) => vocab.get(id)?.collectionId !== item.collectionId);
    if (unknown.length) throw new HttpProblem(422, 'Unknown subject', `Subject ${unknown.join(', ')} is not in this item's collection.`, { type: '/problems/unknown-subject' });
    const proposals = new Map((await Suggestion.findAll({ where: { itemId }, transaction })).map((s) => [s.subjectId, s.subjectModelId]));
    const judgements: SecondJudgement[] = [
      ...input.present.map((subjectId) => ({ subjectId, present: true, subjectModelId: proposals.get(subjectId) ?? null })),
      ...input.absent.map((subjectId) => ({ subjectId, present: false, subjectModelId: proposals.get(subjectId) ?? null })),
    ];
    try {
      const row = await SecondReview.create({ itemId, reviewerId: actor.id, firstReviewerId: item.approvedBy, judgements }, { transaction });
      await audit({ action: 'review-second-recorded', actorId: actor.id, ip: actor.ip, targetType: 'item', targetId: itemId, detail: { present: input.present.length, absent: input.absent.length } }, transaction);
      return { id: row.id };
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw new HttpProblem(409, 'Already reviewed twice', `${item.identifier} already has its second review.`, { type: '/problems/already-reviewed-twice' });
      throw err;
    }
  });
}
