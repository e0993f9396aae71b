import { METHOD_LABELS } from '../../../../common/api/subjects.ts';
import type { ExampleMedium, SubjectKind, SubjectStatus, SynthesisMethod } from '../../api/subjects';

/** The studio's words for media, kinds, states and synthesis methods, in one place. */

export const mediumWords: Record<ExampleMedium, { label: string; hint: string }> = {
  sketch: { label: 'Sketch', hint: 'a drawing made for this subject, on paper or on the sketch pad' },
  illustration: { label: 'Illustration', hint: 'a print, engraving, clip art or other drawn picture' },
  photo: { label: 'Photo', hint: 'a photograph' },
};

export const originWords: Record<'drawn' | 'uploaded' | 'promoted', string> = {
  drawn: 'drawn on the sketch pad',
  uploaded: 'uploaded',
  promoted: 'taken from a reviewed item',
};

export const kindWords: Record<SubjectKind, string> = {
  subject: 'Subject (what the image shows)',
  form: 'Form (what kind of object the image is)',
};

export const kindShort: Record<SubjectKind, string> = { subject: 'subject', form: 'form' };

export const statusWords: Record<SubjectStatus, { label: string; hint: string }> = {
  draft: { label: 'Draft', hint: 'being defined; the night shift does not suggest it yet' },
  active: { label: 'Active', hint: 'the night shift suggests it for new scans' },
  retired: { label: 'Retired', hint: 'kept for the record; no longer suggested or offered' },
};

export function methodWords(method: SynthesisMethod): { label: string; explanation: string } {
  switch (method) {
    case 'prototype':
      return { label: METHOD_LABELS.prototype, explanation: 'the mean of the examples’ features (weight imprinting); it needs nothing but the examples.' };
    case 'regressed':
      return { label: METHOD_LABELS.regressed, explanation: 'the examples’ average mapped by a model regression network trained on this collection’s subjects with reviewed items.' };
    case 'photo_augmented':
      return { label: METHOD_LABELS.photo_augmented, explanation: 'the examples together with the items editors confirmed for this subject.' };
    case 'trained':
      return { label: METHOD_LABELS.trained, explanation: 'a classifier fitted to the items editors confirmed and rejected.' };
    case 'refined':
      return { label: METHOD_LABELS.refined, explanation: 'the broader subject’s model, turned towards this subject’s examples and away from its siblings.' };
    case 'carried':
      return { label: METHOD_LABELS.carried, explanation: 'a model trained on a collection of another medium, moved across to this one.' };
    default:
      return { label: String(method), explanation: 'a method this screen has no description for yet.' };
  }
}

export const percent = (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${Math.round(v * 100)} %`);
