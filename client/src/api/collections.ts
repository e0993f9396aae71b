import { queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

export interface CollectionSummary {
  id: number;
  slug: string;
  name: string;
  description: string;
  medium: string;
  itemCount: number;
  subjectCount: number;
  formCount: number;
  /** Items with at least one proposed suggestion waiting for review. */
  suggestedCount: number;
  /** Items whose alt text is approved. */
  approvedCount: number;
  decorativeCount: number;
  lastRunAt: string | null;
}

export interface CollectionsResponse {
  collections: CollectionSummary[];
}

/** GET /api/collections */
export async function getCollections(signal?: AbortSignal): Promise<CollectionsResponse> {
  const body = await http.get<CollectionsResponse | undefined>('/api/collections', { signal });
  if (!body || !Array.isArray(body.collections)) throw unexpectedShape('/api/collections', 'a list of collections');
  return body;
}

export function collectionsQueryOptions() {
  return queryOptions({
    queryKey: queryKeys.collections.list(),
    queryFn: ({ signal }) => getCollections(signal),
  });
}

export function useCollections() {
  return useQuery(collectionsQueryOptions());
}
