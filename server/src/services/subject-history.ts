import { AuditEvent, User } from '../models/index.ts';
import { METHOD_LABELS, type SubjectHistoryEntry } from '../../../common/api/subjects.ts';

/** The subject's fields in words, as its form labels them. */
const FIELD_WORDS: Record<string, string> = {
  prefLabel: 'preferred label',
  altLabels: 'alternative labels',
  kind: 'kind',
  broaderId: 'broader subject',
  notation: 'notation',
  scopeNote: 'scope note',
  altTextPhrase: 'alt-text phrase',
  conceptUri: 'concept URI',
  status: 'status',
  feedsAltText: 'whether it feeds alt-text drafts',
};

type Detail = Record<string, unknown>;
const text = (v: unknown) => (v === null || v === undefined || v === '' ? 'nothing' : Array.isArray(v) ? v.join(', ') || 'nothing' : `“${String(v)}”`);

function changedWords(d: Detail): string {
  const changes = (d.changes ?? {}) as Record<string, { from: unknown; to: unknown }>;
  const parts = Object.entries(changes).map(([field, c]) =>
    field === 'prefLabel' || field === 'status' || field === 'notation' ? `${FIELD_WORDS[field]} from ${text(c.from)} to ${text(c.to)}` : (FIELD_WORDS[field] ?? field),
  );
  return parts.length ? `changed the ${parts.join('; the ')}` : 'saved the subject';
}

/** "a sketch example", "an illustration example", "an example" */
function anExample(d: Detail): string {
  const medium = typeof d.medium === 'string' ? d.medium : '';
  if (!medium) return 'an example';
  return `${/^[aeiou]/.test(medium) ? 'an' : 'a'} ${medium} example`;
}

const SUMMARY: Record<string, (d: Detail) => string> = {
  'subject-created': (d) => `created the subject ${text(d.prefLabel)}`,
  'subject-changed': changedWords,
  'subject-retired': (d) => `retired the subject (${changedWords(d)})`,
  'subject-moved': () => 'moved it under another broader subject',
  'example-added': (d) => `added ${anExample(d)}${d.fileName ? ` (${String(d.fileName)})` : ''}`,
  'example-removed': (d) => `removed ${anExample(d)}`,
  'subject-model-made': (d) => `made model version ${String(d.version)}: ${(METHOD_LABELS as Record<string, string>)[String(d.method)]?.toLowerCase() ?? String(d.method)}`,
};

/**
 * A subject's history from the audit trail, newest first: who created, changed, moved or retired it, added or
 * removed its examples and made its model versions through the studio. (Model versions the night shift makes
 * have no person behind them and are in the model history instead.)
 */
export async function subjectHistory(subjectId: number, limit = 100): Promise<SubjectHistoryEntry[]> {
  const events = await AuditEvent.findAll({ where: { targetType: 'subject', targetId: String(subjectId) }, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit });
  const actorIds = [...new Set(events.map((e) => e.actorId).filter((id): id is number => id !== null))];
  const people = new Map((await User.findAll({ where: { id: actorIds }, attributes: ['id', 'displayName'] })).map((u) => [u.id, u.displayName]));
  return events.map((e) => ({
    at: e.createdAt.toISOString(),
    action: e.action,
    actor: e.actorId ? { id: e.actorId, name: people.get(e.actorId) ?? `person ${e.actorId}` } : null,
    summary: (SUMMARY[e.action] ?? (() => e.action))(e.detail ?? {}),
  }));
}
