import sharp from 'sharp';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from '../../server/src/config.ts';
import { Collection, Item, Subject, Suggestion, type User } from '../../server/src/models/index.ts';
import type { ExportItem } from '../../server/src/services/exports/rows.ts';
import { Storage } from '../../server/src/services/storage.ts';
import { makePerson } from './people.ts';

/**
 * A small catalogue of the invented Kestrelmouth Harbour Museum for the export tests: six items in every
 * state (approved with alt text and a long description full of characters that need quoting and
 * escaping, decorative, draft, suggested, approved outside the period, a second file of the same name),
 * subjects with and without concept URIs, and decisions inside and outside the week 2026-11-23…29.
 */
export interface LedgerSeed {
  collection: Collection;
  editors: [User, User];
  manager: User;
  subjects: { engraving: Subject; lighthouse: Subject; pier: Subject; storm: Subject };
  items: Item[];
  /** the tricky texts, as stored */
  text: { alt: string; long: string };
}

export const SEED_PERIOD = { from: '2026-11-23', to: '2026-11-29' };
export const VOCAB = 'https://kestrelmouth-harbour.example/vocabulary/harbour-plates/';

export async function seedLedger(sequelize: Sequelize, config: AppConfig): Promise<LedgerSeed> {
  const storage = new Storage(config.storageDir);
  const collection = await Collection.create({
    slug: 'harbour-plates',
    name: 'Harbour plates',
    description: 'Engraved plates of the harbour, its pier and its lighthouse.',
    medium: 'engraving',
    altTextLanguage: 'en-GB',
    houseStyle: '',
    scheduleTimezone: 'Europe/London',
    dropFolder: null,
    archivedAt: null,
  });
  const editors: [User, User] = [await makePerson('editor', { displayName: 'Morwen Tidewell' }), await makePerson('editor', { displayName: 'Ilse Brackwater' })];
  const manager = await makePerson('manager', { displayName: 'Hale Quayside' });
  const subject = (prefLabel: string, kind: 'subject' | 'form', conceptUri: string | null) =>
    Subject.create({ collectionId: collection.id, broaderId: null, kind, prefLabel, altLabels: [], notation: null, scopeNote: null, altTextPhrase: null, conceptUri, status: 'active' });
  const subjects = {
    engraving: await subject('engraving', 'form', `${VOCAB}engraving`),
    lighthouse: await subject('lighthouse', 'subject', `${VOCAB}lighthouse`),
    pier: await subject('pier & jetty', 'subject', `${VOCAB}pier-and-jetty`),
    storm: await subject('storm', 'subject', null),
  };
  const alt = 'An engraving of the lighthouse "Old Tom" at Kestrelmouth, seen from the pier; waves & spray <high tide>.';
  const long =
    'The plate shows the harbour’s café, the lighthouse and, on the right, a fishing boat, its sail reefed.\r\nA second line: "quoted", with a comma, and an apostrophe (it’s) — plus é, ß and 灯台.';
  const image = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 90, b: 120 } } }).jpeg().toBuffer();
  const key = await storage.put(image);

  const specs: Array<{ identifier: string; fileName: string; state: Item['state']; altText: string | null; longDescription?: string; decorative?: boolean; approver?: User; approvedAt?: string; createdAt: string }> = [
    { identifier: 'KHM-P-0001', fileName: 'plate-0001.tif', state: 'approved', altText: alt, longDescription: long, approver: editors[0], approvedAt: '2026-11-24T10:15:00Z', createdAt: '2026-11-02T09:00:00Z' },
    { identifier: 'KHM-P-0002', fileName: 'plate-0002.jpg', state: 'approved', altText: null, decorative: true, approver: editors[1], approvedAt: '2026-11-29T23:30:00Z', createdAt: '2026-11-02T09:01:00Z' },
    { identifier: 'KHM-P-0003', fileName: 'plate-0003.jpg', state: 'new', altText: 'A draft nobody approved.', createdAt: '2026-11-03T09:00:00Z' },
    { identifier: 'KHM-P-0004', fileName: 'plate-0004.jpg', state: 'suggested', altText: null, createdAt: '2026-11-03T09:01:00Z' },
    { identifier: 'KHM-P-0005', fileName: 'plate-0005.png', state: 'approved', altText: 'An engraving of the pier in a storm.', approver: editors[0], approvedAt: '2026-10-01T08:00:00Z', createdAt: '2026-09-30T09:00:00Z' },
    { identifier: 'KHM-P-0006', fileName: 'plate-0001.tif', state: 'approved', altText: 'A second print of the lighthouse plate, trimmed.', approver: editors[1], approvedAt: '2026-11-26T12:00:00Z', createdAt: '2026-11-20T09:00:00Z' },
  ];
  const items: Item[] = [];
  for (const s of specs) {
    const item = await Item.create({
      collectionId: collection.id,
      identifier: s.identifier,
      fileName: s.fileName,
      fileKey: key,
      thumbKey: key,
      viewKey: key,
      mimeType: 'image/tiff',
      width: 640,
      height: 480,
      byteSize: 1000,
      caption: 'Plate from the harbour series, 1881',
      creator: null,
      dateText: '1881',
      rights: null,
      captionFlagNote: null,
      state: s.state,
      altText: s.altText,
      longDescription: s.longDescription ?? null,
      decorative: s.decorative ?? false,
      ocrText: null,
      approvedBy: s.approver?.id ?? null,
      approvedAt: s.approvedAt ? new Date(s.approvedAt) : null,
    });
    await sequelize.query('UPDATE items SET created_at = :at WHERE id = :id', { replacements: { at: new Date(s.createdAt), id: item.id } });
    items.push(item);
  }
  const decide = (item: Item, subj: Subject, state: Suggestion['state'], by: User | null, at: string | null) =>
    Suggestion.create({ itemId: item.id, subjectId: subj.id, subjectModelId: null, runId: null, score: 0.7, probability: 0.7, state, decidedBy: by?.id ?? null, decidedAt: at ? new Date(at) : null });
  const [i1, i2, , i4, i5, i6] = items as [Item, Item, Item, Item, Item, Item];
  await decide(i1, subjects.engraving, 'accepted', editors[0], '2026-11-24T10:10:00Z');
  await decide(i1, subjects.lighthouse, 'accepted', editors[0], '2026-11-24T10:11:00Z');
  await decide(i1, subjects.pier, 'added', editors[0], '2026-11-24T10:12:00Z');
  await decide(i1, subjects.storm, 'rejected', editors[0], '2026-11-24T10:13:00Z');
  await decide(i2, subjects.lighthouse, 'rejected', editors[1], '2026-11-25T11:00:00Z');
  await decide(i4, subjects.lighthouse, 'proposed', null, null);
  await decide(i5, subjects.pier, 'accepted', editors[0], '2026-10-01T07:59:00Z');
  await decide(i5, subjects.storm, 'added', editors[0], '2026-10-01T07:58:00Z');
  await decide(i6, subjects.lighthouse, 'accepted', editors[1], '2026-11-26T11:59:00Z');
  return { collection, editors, manager, subjects, items, text: { alt, long } };
}

/** One approved item as the export writers receive it, without a database (for the reference checks). */
export function sampleExportItem(over: Partial<ExportItem> = {}): ExportItem {
  return {
    id: 7,
    identifier: 'KHM-P-0007',
    fileName: 'plate-0007.tif',
    caption: 'Plate from the harbour series',
    creator: null,
    dateText: '1881',
    rights: null,
    state: 'approved',
    altText: 'An engraving of the pier at low tide.',
    longDescription: 'Boats lie on the mud; a figure walks the pier.',
    decorative: false,
    approvedBy: 1,
    approvedByName: 'Morwen Tidewell',
    approvedAt: new Date('2026-11-24T10:00:00Z'),
    createdAt: new Date('2026-11-01T10:00:00Z'),
    width: 3000,
    height: 2000,
    mimeType: 'image/tiff',
    viewKey: 'a'.repeat(64),
    fileKey: 'a'.repeat(64),
    subjects: [{ id: 1, label: 'pier', conceptUri: `${VOCAB}pier`, kind: 'subject' }],
    ...over,
  };
}
