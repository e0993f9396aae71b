import { z } from 'zod';

/** A subject (or a form/genre term) of a collection's vocabulary, as the forms send it and the API accepts it. */

export const SUBJECT_KIND_VALUES = ['subject', 'form'] as const;
export const SUBJECT_STATUS_VALUES = ['draft', 'active', 'retired'] as const;

const label = z
  .string()
  .trim()
  .min(1, 'A label cannot be empty.')
  .max(200, 'At most 200 characters.')
  .refine((v) => !/[\r\n\t]/.test(v), 'One line only.');

/** Optional text: empty (or null) is stored as none. */
const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `At most ${max} characters.`)
    .nullable()
    .transform((v) => (v === null || v === '' ? null : v));

/** An absolute IRI for the concept (http, https or urn); empty for none (Cartouche mints one). */
export const conceptUriSchema = z
  .string()
  .trim()
  .max(500, 'At most 500 characters.')
  .nullable()
  .transform((v) => v ?? '')
  .refine((v) => v === '' || /^(https?:\/\/[^\s<>"{}|\\^`]+|urn:[a-z0-9][a-z0-9-]{0,31}:[^\s<>"{}|\\^`]+)$/i.test(v), 'An absolute address such as https://…/plates/lighthouse, or leave it empty.')
  .transform((v) => (v === '' ? null : v));

/** Labels compared the way people read them: case and surrounding space do not make a new label. */
export const sameLabel = (a: string, b: string) => a.trim().toLocaleLowerCase() === b.trim().toLocaleLowerCase();

const fields = {
  prefLabel: label,
  altLabels: z.array(label).max(50, 'At most 50 alternative labels.'),
  kind: z.enum(SUBJECT_KIND_VALUES, { error: 'Either a subject or a form.' }),
  broaderId: z.number().int().positive().nullable(),
  notation: optionalText(60),
  scopeNote: optionalText(5000),
  altTextPhrase: optionalText(200),
  status: z.enum(SUBJECT_STATUS_VALUES, { error: 'Draft, active or retired.' }),
  feedsAltText: z.boolean(),
  conceptUri: conceptUriSchema,
};

/** Alternative labels differ from each other and from the preferred label (SKOS Reference S13 asks the same of one language). */
function checkLabels(value: { prefLabel: string; altLabels: string[] }, ctx: z.RefinementCtx) {
  value.altLabels.forEach((alt, i) => {
    if (sameLabel(alt, value.prefLabel)) ctx.addIssue({ code: 'custom', path: ['altLabels', i], message: 'Already the preferred label.' });
    else if (value.altLabels.findIndex((other) => sameLabel(other, alt)) < i) ctx.addIssue({ code: 'custom', path: ['altLabels', i], message: 'Listed twice.' });
  });
}

/** POST /api/collections/:id/subjects */
export const subjectCreateSchema = z.object(fields).superRefine(checkLabels);
export type SubjectCreateInput = z.input<typeof subjectCreateSchema>;
export type SubjectCreate = z.output<typeof subjectCreateSchema>;

/** PUT /api/subjects/:id — the whole record and the version the editor's copy was read at. */
export const subjectUpdateSchema = z.object({ ...fields, version: z.number().int().positive() }).superRefine(checkLabels);
export type SubjectUpdateInput = z.input<typeof subjectUpdateSchema>;
export type SubjectUpdate = z.output<typeof subjectUpdateSchema>;

/** POST /api/subjects/:id/move — re-parent (drag, or "Move under…"); null makes it a top concept. */
export const subjectMoveSchema = z.object({ broaderId: z.number().int().positive().nullable(), version: z.number().int().positive() });
export type SubjectMove = z.output<typeof subjectMoveSchema>;
