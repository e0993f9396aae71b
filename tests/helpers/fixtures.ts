import { Collection, Item, Subject, Suggestion, User, type Role } from '../../server/src/models/index.ts';

let n = 0;
const next = () => ++n;

export async function makeUser(role: Role, email = `person${next()}@fixture.example`): Promise<User> {
  return User.create({ email, displayName: `Fixture ${role} ${n}`, role, passwordHash: null, samlNameId: null, lastSignInAt: null });
}

export async function makeCollection(fields: Partial<{ slug: string; name: string; medium: string; archivedAt: Date | null }> = {}): Promise<Collection> {
  const i = next();
  return Collection.create({
    slug: fields.slug ?? `fixture-${i}`,
    name: fields.name ?? `Fixture collection ${i}`,
    description: 'A collection made by a test.',
    medium: fields.medium ?? 'engraving',
    houseStyle: '',
    dropFolder: null,
    archivedAt: fields.archivedAt ?? null,
  });
}

export async function makeSubject(collection: Collection, fields: Partial<{ prefLabel: string; kind: 'subject' | 'form'; status: 'draft' | 'active' | 'retired'; broaderId: number | null }> = {}): Promise<Subject> {
  return Subject.create({
    collectionId: collection.id,
    broaderId: fields.broaderId ?? null,
    kind: fields.kind ?? 'subject',
    prefLabel: fields.prefLabel ?? `subject ${next()}`,
    altLabels: [],
    notation: null,
    scopeNote: null,
    altTextPhrase: null,
    conceptUri: null,
    status: fields.status ?? 'active',
  });
}

export async function makeItem(collection: Collection, fields: Partial<{ identifier: string; state: 'new' | 'suggested' | 'approved'; decorative: boolean; approvedAt: Date | null }> = {}): Promise<Item> {
  const i = next();
  return Item.create({
    collectionId: collection.id,
    identifier: fields.identifier ?? `FIX-${i}`,
    fileName: `fix-${i}.jpg`,
    fileKey: null,
    mimeType: null,
    width: null,
    height: null,
    byteSize: null,
    caption: null,
    creator: null,
    dateText: null,
    rights: null,
    captionFlagNote: null,
    state: fields.state ?? 'new',
    altText: fields.state === 'approved' && !fields.decorative ? 'An engraving of a pier.' : null,
    longDescription: null,
    decorative: fields.decorative ?? false,
    ocrText: null,
    approvedBy: null,
    approvedAt: fields.approvedAt ?? null,
  });
}

export async function makeSuggestion(item: Item, subject: Subject, state: 'proposed' | 'accepted' | 'rejected' | 'added' = 'proposed'): Promise<Suggestion> {
  return Suggestion.create({
    itemId: item.id,
    subjectId: subject.id,
    subjectModelId: null,
    runId: null,
    score: 0.5,
    probability: 0.5,
    state,
    decidedBy: null,
    decidedAt: null,
  });
}
