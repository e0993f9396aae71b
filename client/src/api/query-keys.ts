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
  mailbox: {
    all: ['mailbox'] as const,
    list: () => [...queryKeys.mailbox.all, 'list'] as const,
    message: (id: string) => [...queryKeys.mailbox.all, 'message', id] as const,
  },
} as const;
