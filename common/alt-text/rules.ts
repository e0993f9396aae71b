/**
 * The alt-text checker: pure rules that give the same answer in the browser as the editor types and on the
 * server at approval. Each rule has an id, a severity (an error blocks approval, a warning does not), a
 * message in plain words and the source it rests on, so the desk's help can cite it.
 */

export type Severity = 'error' | 'warning';

export interface RuleSource {
  /** short citation shown beside the rule, e.g. "WCAG 2.2 technique H67" */
  label: string;
  url?: string;
}

export interface AltTextRule {
  id: string;
  severity: Severity;
  /** what the rule asks, for the help overlay */
  summary: string;
  sources: RuleSource[];
}

export interface Finding {
  ruleId: string;
  severity: Severity;
  message: string;
  sources: RuleSource[];
}

export interface CheckInput {
  altText: string;
  longDescription?: string | null;
  decorative: boolean;
  /** the scan's file name and identifier: an alt text that merely repeats them is a file-name alt */
  fileName?: string | null;
  identifier?: string | null;
  caption?: string | null;
  /** text read from the image (OCR), one line per line */
  ocrText?: string | null;
}

const WCAG_TECHNIQUES = 'https://www.w3.org/WAI/WCAG22/Techniques/';
const src = {
  h67: { label: 'WCAG 2.2 technique H67 (null alt text for decorative images)', url: `${WCAG_TECHNIQUES}html/H67` },
  f39: { label: 'WCAG 2.2 failure F39 (decorative image with a non-null alt)', url: `${WCAG_TECHNIQUES}failures/F39` },
  f65: { label: 'WCAG 2.2 failure F65 (no text alternative)', url: `${WCAG_TECHNIQUES}failures/F65` },
  sc111: { label: 'WCAG 2.2 SC 1.1.1 Non-text Content', url: 'https://www.w3.org/TR/WCAG22/#non-text-content' },
  f30: { label: 'WCAG 2.2 failure F30 (alt that is not an alternative: placeholders, file names)', url: `${WCAG_TECHNIQUES}failures/F30` },
  h37: { label: 'WCAG 2.2 technique H37 (words in the image belong in the alt)', url: `${WCAG_TECHNIQUES}html/H37` },
  g95: { label: 'WCAG 2.2 technique G95 (short alternative plus long description)', url: `${WCAG_TECHNIQUES}general/G95` },
  practice: { label: 'common practice: screen readers already announce an image' },
  uw125: { label: 'common practice; University of Washington AccessIT: some screen readers read alt text in chunks of about 125 characters' },
  iptc250: { label: 'common practice; IPTC Photo Metadata user guide: editing tools may flag alt text over 250 characters', url: 'https://www.iptc.org/std/photometadata/documentation/userguide/' },
  iptcRepeat: { label: 'IPTC Photo Metadata user guide: the extended description should not repeat the alt text', url: 'https://www.iptc.org/std/photometadata/documentation/userguide/' },
  iptcCaption: { label: 'IPTC Photo Metadata user guide: do not fill the alt text from the caption automatically', url: 'https://www.iptc.org/std/photometadata/documentation/userguide/' },
} satisfies Record<string, RuleSource>;

export const SOFT_LIMIT = 125;
export const HARD_LIMIT = 250;

/** Every rule the checker knows, in the order the help lists them. */
export const ALT_TEXT_RULES: readonly AltTextRule[] = [
  { id: 'decorative-not-empty', severity: 'error', summary: 'A decorative image has an empty alt text, so assistive technology can ignore it.', sources: [src.h67, src.f39] },
  { id: 'alt-missing', severity: 'error', summary: 'Only decorative images may have an empty alt text; every other image needs one.', sources: [src.sc111, src.h67, src.f65] },
  { id: 'placeholder', severity: 'error', summary: 'No placeholder alt text such as "image", "picture", "spacer" or "picture 1".', sources: [src.f30] },
  { id: 'file-name', severity: 'error', summary: 'No file name or bare identifier as alt text.', sources: [src.f30] },
  { id: 'leading-image-of', severity: 'warning', summary: 'Do not open with "image of", "picture of" or "photo of"; name the form instead ("Engraving of …").', sources: [src.practice] },
  { id: 'over-125', severity: 'warning', summary: `Over about ${SOFT_LIMIT} characters: consider shortening.`, sources: [src.uw125] },
  { id: 'over-250', severity: 'warning', summary: `Over about ${HARD_LIMIT} characters: move detail into the long description.`, sources: [src.iptc250, src.g95] },
  { id: 'long-content', severity: 'warning', summary: 'More than two sentences: long content belongs in the long description.', sources: [src.g95] },
  { id: 'visible-text-missing', severity: 'warning', summary: 'Text that is prominent in the image (found by OCR) should appear in the alt text.', sources: [src.h37] },
  { id: 'caption-copied', severity: 'warning', summary: 'The alt text is the caption word for word; say what the image shows.', sources: [src.iptcCaption] },
  { id: 'long-description-repeats', severity: 'warning', summary: 'The long description repeats the alt text; it should add to it.', sources: [src.iptcRepeat] },
];

const RULES = new Map(ALT_TEXT_RULES.map((r) => [r.id, r]));

function finding(ruleId: string, message: string): Finding {
  const rule = RULES.get(ruleId);
  if (!rule) throw new Error(`unknown alt-text rule ${ruleId}`);
  return { ruleId, severity: rule.severity, message, sources: rule.sources };
}

/** Lower case, letters and digits only, single spaces. */
export function normalise(text: string): string {
  return text
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

// F30's examples ("spacer", "image", "picture", "picture 1", "0001") and their everyday relatives
const PLACEHOLDER_WORDS = new Set([
  'image', 'images', 'picture', 'pictures', 'photo', 'photos', 'photograph', 'graphic', 'graphics', 'img', 'pic', 'spacer',
  'placeholder', 'alt', 'alt text', 'untitled', 'no title', 'none', 'n a', 'na', 'tbd', 'todo', 'to do', 'description',
  'scan', 'item', 'figure', 'fig', 'illustration', 'blank', 'empty', 'text', 'xxx', 'test',
]);
const PLACEHOLDER_NUMBERED = /^(image|picture|photo|pic|img|figure|fig|scan|item|plate|page)?\s*\d+$/;
const FILE_EXTENSION = /\.(jpe?g|png|gif|tiff?|webp|bmp|heic|jp2|pdf|svg)\s*$/i;
const LEADING_MEDIUMLESS = /^\s*(an?\s+)?(image|picture|photo|graphic|pic)\s+(of|showing)\b/i;

/** The most prominent line OCR found: the one with the most letters among lines of two or more words. */
export function prominentLine(ocrText: string | null | undefined): string | null {
  if (!ocrText) return null;
  let best: string | null = null;
  let bestLetters = 0;
  for (const raw of ocrText.split(/\r?\n/)) {
    const line = raw.trim();
    const words = normalise(line).split(' ').filter((w) => /[a-z]/.test(w) && w.length >= 2);
    if (words.length < 2) continue;
    const letters = words.join('').length;
    if (letters >= 6 && letters > bestLetters) {
      best = line;
      bestLetters = letters;
    }
  }
  return best;
}

/** Whether most of a line's words (three letters or more) are in the text. */
export function containsMostWords(text: string, line: string): boolean {
  const have = new Set(normalise(text).split(' '));
  const words = normalise(line).split(' ').filter((w) => w.length >= 3);
  if (words.length === 0) return true;
  const found = words.filter((w) => have.has(w)).length;
  return found / words.length >= 0.6;
}

function sentenceCount(text: string): number {
  return text
    .split(/(?<=[.!?])\s+(?=[A-Z0-9"“‘'])/)
    .map((s) => s.trim())
    .filter((s) => s.length > 0).length;
}

/** Runs every rule over an alt text (and its long description); the findings, errors first. */
export function checkAltText(input: CheckInput): Finding[] {
  const alt = input.altText;
  const trimmed = alt.trim();
  const norm = normalise(alt);
  const out: Finding[] = [];

  if (input.decorative) {
    if (alt.length > 0) out.push(finding('decorative-not-empty', 'This item is marked decorative, so its alt text must be empty. Clear it, or untick decorative.'));
    return out;
  }
  if (trimmed.length === 0) {
    out.push(finding('alt-missing', alt.length > 0 ? 'The alt text is only spaces. Describe the image, or mark it decorative if it adds nothing.' : 'Write an alt text, or mark the item decorative if it adds nothing.'));
    return out;
  }
  if (PLACEHOLDER_WORDS.has(norm) || PLACEHOLDER_NUMBERED.test(norm) || norm.length === 0) {
    out.push(finding('placeholder', `"${trimmed}" is a placeholder, not a description of the image.`));
  } else {
    const names = [input.fileName, input.identifier].filter((n): n is string => Boolean(n && n.trim()));
    const baseOf = (n: string) => normalise(n.replace(FILE_EXTENSION, ''));
    if (FILE_EXTENSION.test(trimmed) && !/\s/.test(trimmed.replace(FILE_EXTENSION, '').trim())) {
      out.push(finding('file-name', `"${trimmed}" is a file name, not a description of the image.`));
    } else if (names.some((n) => baseOf(n) === norm || normalise(n) === norm)) {
      out.push(finding('file-name', `"${trimmed}" repeats the scan's file name or identifier; describe what it shows.`));
    }
  }
  if (LEADING_MEDIUMLESS.test(alt)) {
    out.push(finding('leading-image-of', 'Screen readers already say "image": drop the opening words, or name the form ("Engraving of …").'));
  }
  const length = [...trimmed].length;
  if (length > HARD_LIMIT) {
    out.push(finding('over-250', `${length} characters, over about ${HARD_LIMIT}: keep the alt text short and move the detail into the long description.`));
  } else if (length > SOFT_LIMIT) {
    out.push(finding('over-125', `${length} characters, over about ${SOFT_LIMIT}: consider a shorter alt text.`));
  }
  if (sentenceCount(trimmed) > 2) {
    out.push(finding('long-content', 'More than two sentences: keep the essentials here and put the rest in the long description.'));
  }
  const line = prominentLine(input.ocrText);
  if (line && !containsMostWords(alt, line)) {
    out.push(finding('visible-text-missing', `The image shows the words "${line}", which the alt text does not include.`));
  }
  if (input.caption && normalise(input.caption) === norm) {
    out.push(finding('caption-copied', 'The alt text is the catalogue caption word for word; say what the image shows.'));
  }
  const long = input.longDescription?.trim();
  if (long && (normalise(long) === norm || normalise(long).startsWith(norm))) {
    out.push(finding('long-description-repeats', 'The long description begins with the alt text again; let it add what the alt text leaves out.'));
  }
  return out.sort((a, b) => (a.severity === b.severity ? 0 : a.severity === 'error' ? -1 : 1));
}

export function hasErrors(findings: readonly Finding[]): boolean {
  return findings.some((f) => f.severity === 'error');
}
