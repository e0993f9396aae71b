export { ALT_TEXT_RULES, HARD_LIMIT, SOFT_LIMIT, checkAltText, containsMostWords, hasErrors, normalise, prominentLine } from './rules.ts';
export type { AltTextRule, CheckInput, Finding, RuleSource, Severity } from './rules.ts';
export { composeDraft, draftSubjects, listPhrases } from './compose.ts';
export type { DraftInput, DraftSubject } from './compose.ts';
