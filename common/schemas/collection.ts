import { z } from 'zod';

/**
 * A collection's settings as the collection form sends them and the API accepts them. The night-shift
 * schedule and drop folder have their own form and route (the Night shift screen's), reused by the
 * collection settings page.
 */

export const SLUG_PATTERN = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

/** Shortest and longest alt-text length guidance an archivist may set (characters). */
export const ALT_TEXT_LENGTH_RANGE = { min: 20, max: 2000 } as const;

/**
 * True for a well-formed BCP 47 language tag ("en", "cy-GB", "zh-Hant-TW", "es-419"). Uses the
 * ECMAScript Intl API, which checks the structure of Unicode BCP 47 locale identifiers in the
 * browser and in Node alike. Cartouche also asks for a two- or three-letter primary language (ISO 639):
 * BCP 47 reserves longer primary subtags, which no language in use has.
 */
export function isLanguageTag(value: string): boolean {
  if (!/^[A-Za-z]{2,3}(-[A-Za-z0-9]{1,8})*$/.test(value) || value.length > 35) return false;
  try {
    return Intl.getCanonicalLocales(value).length === 1;
  } catch {
    return false;
  }
}

const name = z.string().trim().min(1, 'Give the collection a name.').max(200, 'At most 200 characters.');
const slug = z
  .string()
  .trim()
  .min(2, 'At least 2 characters.')
  .max(80, 'At most 80 characters.')
  .regex(SLUG_PATTERN, 'Lower-case letters, digits and single hyphens only, e.g. “harbour-plates”.');
const description = z.string().trim().max(5000, 'At most 5000 characters.');
const medium = z.string().trim().min(1, 'Say what the collection’s images are, e.g. “engraving” or “photograph”.').max(60, 'At most 60 characters.');
const altTextLanguage = z
  .string()
  .trim()
  .refine(isLanguageTag, 'A language tag such as “en”, “cy” or “fr-CA” (BCP 47).');
const altTextMaxLength = z
  .number({ error: 'A whole number of characters.' })
  .int('A whole number of characters.')
  .min(ALT_TEXT_LENGTH_RANGE.min, `At least ${ALT_TEXT_LENGTH_RANGE.min} characters.`)
  .max(ALT_TEXT_LENGTH_RANGE.max, `At most ${ALT_TEXT_LENGTH_RANGE.max} characters.`);
const houseStyle = z.string().trim().max(10000, 'At most 10 000 characters.');
/**
 * Whether the night shift reads the text in the collection's scans (OCR). Optional: a new collection reads text
 * (the column's default), and a save that leaves it out keeps what is stored.
 */
const readText = z.boolean({ error: 'Yes or no: true or false.' }).optional();

/** POST /api/collections */
export const collectionCreateSchema = z.object({
  name,
  slug,
  description,
  medium,
  altTextLanguage,
  altTextMaxLength,
  houseStyle,
  readText,
});
export type CollectionCreateInput = z.input<typeof collectionCreateSchema>;
export type CollectionCreate = z.output<typeof collectionCreateSchema>;

/**
 * PUT /api/collections/:id — every setting at once, plus `feedingSubjectIds` (the subjects whose
 * alt-text phrase may go into an alt-text draft) and the `updatedAt` the editor's copy was read at:
 * a save from a stale copy is refused rather than overwriting someone else's change.
 */
export const collectionUpdateSchema = collectionCreateSchema.extend({
  feedingSubjectIds: z.array(z.number().int().positive()).max(5000),
  updatedAt: z.iso.datetime({ offset: true, error: 'The time this copy was read (ISO 8601).' }),
});
export type CollectionUpdateInput = z.input<typeof collectionUpdateSchema>;
export type CollectionUpdate = z.output<typeof collectionUpdateSchema>;

/** A collection's settings as GET /api/collections/:id answers them (and the settings page shows them). */
export interface CollectionDetail {
  id: number;
  slug: string;
  name: string;
  description: string;
  medium: string;
  altTextLanguage: string;
  altTextMaxLength: number;
  houseStyle: string;
  scheduleCron: string;
  scheduleTimezone: string;
  scheduleEnabled: boolean;
  /** '' when the collection has no drop folder */
  dropFolder: string;
  /** the night shift reads the text in its scans (OCR); the site can still turn reading off everywhere */
  readText: boolean;
  archivedAt: string | null;
  updatedAt: string;
  /** subjects whose alt-text phrase may go into an alt-text draft */
  feedingSubjectIds: number[];
}
