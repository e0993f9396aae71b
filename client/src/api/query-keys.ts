/**
 * Every TanStack Query key the client uses, in one place.
 * Keys are hierarchical: invalidating a prefix (e.g. `queryKeys.collections.all`)
 * refreshes everything below it.
 */
export const queryKeys = {
  health: () => ['health'] as const,
  collections: {
    all: ['collections'] as const,
    list: () => [...queryKeys.collections.all, 'list'] as const,
  },
} as const;
