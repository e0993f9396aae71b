/**
 * Every TanStack Query key the client uses, in one place.
 * Keys are hierarchical: invalidating a prefix (e.g. `queryKeys.collections.all`)
 * refreshes everything below it.
 */
export const queryKeys = {
  /** Who is signed in, their permissions and the CSRF token; see session.ts. */
  session: () => ['session'] as const,
  /** What an invitation or password-reset link stands for. */
  passwordLink: (token: string) => ['password-link', token] as const,
  health: () => ['health'] as const,
  collections: {
    all: ['collections'] as const,
    list: () => [...queryKeys.collections.all, 'list'] as const,
  },
  people: {
    all: ['people'] as const,
    list: () => [...queryKeys.people.all, 'list'] as const,
  },
  intake: {
    all: ['intake'] as const,
    settings: () => [...queryKeys.intake.all, 'settings'] as const,
    import: (collectionId: number, importId: number) => [...queryKeys.intake.all, 'import', collectionId, importId] as const,
  },
  /** Night-shift runs and schedules. */
  runs: {
    all: ['night-shift'] as const,
    list: (collectionId: number) => [...queryKeys.runs.all, 'runs', collectionId] as const,
    run: (runId: number) => [...queryKeys.runs.all, 'run', runId] as const,
    schedule: (collectionId: number) => [...queryKeys.runs.all, 'schedule', collectionId] as const,
  },
  review: {
    all: ['review'] as const,
    queue: (filters: Record<string, unknown>) => [...queryKeys.review.all, 'queue', filters] as const,
    item: (itemId: number, blind: boolean) => [...queryKeys.review.all, 'item', itemId, blind] as const,
    subjects: (collectionId: number, q: string, kind: string) => [...queryKeys.review.all, 'subjects', collectionId, q, kind] as const,
    grid: (subjectId: number) => [...queryKeys.review.all, 'grid', subjectId] as const,
    secondReviews: (collectionId: number) => [...queryKeys.review.all, 'second-reviews', collectionId] as const,
    settings: (collectionId: number) => [...queryKeys.review.all, 'settings', collectionId] as const,
    agreement: (collectionId: number) => [...queryKeys.review.all, 'agreement', collectionId] as const,
  },
  items: {
    all: ['items'] as const,
    search: (filters: Record<string, unknown>) => [...queryKeys.items.all, 'search', filters] as const,
    facets: (collectionId: number) => [...queryKeys.items.all, 'facets', collectionId] as const,
    record: (itemId: number) => [...queryKeys.items.all, 'record', itemId] as const,
  },
  /** The subject studio: a collection's vocabulary, one subject, its preview, estimate and models. */
  studio: {
    all: ['studio'] as const,
    subjects: (collectionId: number) => [...queryKeys.studio.all, 'subjects', collectionId] as const,
    subject: (subjectId: number) => [...queryKeys.studio.all, 'subject', subjectId] as const,
    preview: (subjectId: number, minZ: number) => [...queryKeys.studio.all, 'preview', subjectId, minZ] as const,
    estimate: (subjectId: number, minZ: number) => [...queryKeys.studio.all, 'estimate', subjectId, minZ] as const,
    models: (subjectId: number) => [...queryKeys.studio.all, 'models', subjectId] as const,
    history: (subjectId: number) => [...queryKeys.studio.all, 'history', subjectId] as const,
    collection: (collectionId: number) => [...queryKeys.studio.all, 'collection', collectionId] as const,
    archived: () => [...queryKeys.studio.all, 'archived-collections'] as const,
  },
  dashboard: {
    all: ['dashboard'] as const,
    coverage: (weeks: number) => [...queryKeys.dashboard.all, 'coverage', weeks] as const,
    collection: (collectionId: number, weeks: number) => [...queryKeys.dashboard.all, 'collection', collectionId, weeks] as const,
  },
  exports: {
    all: ['exports'] as const,
    list: (collectionId: number) => [...queryKeys.exports.all, 'list', collectionId] as const,
    mail: (collectionId: number) => [...queryKeys.exports.all, 'mail', collectionId] as const,
  },
  mailbox: {
    all: ['mailbox'] as const,
    list: () => [...queryKeys.mailbox.all, 'list'] as const,
    message: (id: string) => [...queryKeys.mailbox.all, 'message', id] as const,
  },
} as const;
