/**
 * The alt-text draft: composed from the item's accepted form and subjects (their alt-text phrases) and the
 * catalogue caption, for the editor to finish. It opens with the form ("Engraving of …"), names each subject
 * once (a broader subject is left out when a narrower one of it is there), and adds the caption after a colon
 * while the draft stays short (never the caption alone). A caption flagged for harmful language is never copied into the draft.
 */
import { HARD_LIMIT, containsMostWords, prominentLine } from './rules.ts';

export interface DraftSubject {
  id: number;
  prefLabel: string;
  altTextPhrase?: string | null;
  broaderId?: number | null;
  /** a subject may be kept out of alt text (e.g. an administrative category) */
  feedsAltText?: boolean;
}

export interface DraftInput {
  form?: Pick<DraftSubject, 'prefLabel' | 'altTextPhrase'> | null;
  subjects: readonly DraftSubject[];
  caption?: string | null;
  captionFlagged?: boolean;
  ocrText?: string | null;
}

const ARTICLE = /^(a|an|the)\s+/i;

function phraseOf(s: Pick<DraftSubject, 'prefLabel' | 'altTextPhrase'>): string {
  const phrase = s.altTextPhrase?.trim();
  if (phrase) return phrase;
  const label = s.prefLabel.trim().toLowerCase();
  return `${/^[aeiou]/.test(label) ? 'an' : 'a'} ${label}`;
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** "a", "a and b", "a, b and c" */
export function listPhrases(phrases: readonly string[]): string {
  if (phrases.length <= 1) return phrases[0] ?? '';
  return `${phrases.slice(0, -1).join(', ')} and ${phrases[phrases.length - 1]}`;
}

/** The subjects worth naming: those that feed alt text, without a broader subject whose narrower one is there. */
export function draftSubjects(subjects: readonly DraftSubject[]): DraftSubject[] {
  const feeding = subjects.filter((s) => s.feedsAltText !== false);
  const broaderOfOthers = new Set(feeding.map((s) => s.broaderId).filter((id): id is number => typeof id === 'number'));
  const seen = new Set<string>();
  return feeding.filter((s) => {
    if (broaderOfOthers.has(s.id)) return false;
    const key = phraseOf(s).toLowerCase();
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

function endSentence(s: string): string {
  return /[.!?…"”]$/.test(s) ? s : `${s}.`;
}

export function composeDraft(input: DraftInput): string {
  const phrases = draftSubjects(input.subjects).map(phraseOf);
  const form = input.form ? phraseOf(input.form).replace(ARTICLE, '') : '';
  let head: string;
  if (form && phrases.length) head = `${capitalise(form)} of ${listPhrases(phrases)}`;
  else if (form) head = capitalise(form);
  else if (phrases.length) head = capitalise(listPhrases(phrases));
  else head = '';

  const caption = input.captionFlagged ? '' : (input.caption ?? '').trim().replace(/\s+/g, ' ');
  let draft = head;
  // the caption only ever follows what the item is and shows: alone, it would be the caption copied (IPTC user guide)
  if (caption && head) {
    const withCaption = `${head}: ${caption}`;
    if ([...withCaption].length <= HARD_LIMIT) draft = withCaption;
  }
  const line = prominentLine(input.ocrText);
  if (line && !containsMostWords(draft, line)) {
    const withText = `${draft ? `${endSentence(draft)} ` : ''}It reads “${line}”.`;
    if ([...withText].length <= HARD_LIMIT) draft = withText;
  }
  return draft ? endSentence(draft) : '';
}
