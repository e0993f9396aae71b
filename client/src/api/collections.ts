import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CollectionCreateInput, CollectionDetail, CollectionUpdateInput } from '../../../common/schemas/collection.ts';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

export type { CollectionDetail };

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

// ------------------------------------------------------------------ settings (subject studio)


export interface ArchivedCollection {
  id: number;
  slug: string;
  name: string;
  medium: string;
  archivedAt: string;
}

function readDetail(body: unknown, path: string): CollectionDetail {
  const c = typeof body === 'object' && body !== null ? (body as { collection?: unknown }).collection : undefined;
  if (typeof c !== 'object' || c === null || typeof (c as { id?: unknown }).id !== 'number') throw unexpectedShape(path, 'a collection');
  return c as CollectionDetail;
}

export function useCollection(collectionId: number | null) {
  return useQuery({
    queryKey: queryKeys.studio.collection(collectionId ?? 0),
    queryFn: async ({ signal }) => readDetail(await http.get<unknown>(`/api/collections/${collectionId}`, { signal }), `/api/collections/${collectionId}`),
    enabled: collectionId !== null,
  });
}

export function useArchivedCollections() {
  return useQuery({
    queryKey: queryKeys.studio.archived(),
    queryFn: async ({ signal }) => {
      const body = await http.get<{ collections?: unknown } | undefined>('/api/collections/archived', { signal });
      if (!body || !Array.isArray(body.collections)) throw unexpectedShape('/api/collections/archived', 'a list of archived collections');
      return body.collections as ArchivedCollection[];
    },
  });
}

function useCollectionChange<V>(send: (vars: V) => Promise<CollectionDetail>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: send,
    onSuccess: (c) => {
      queryClient.setQueryData(queryKeys.studio.collection(c.id), c);
      void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.archived() });
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.subjects(c.id) });
    },
  });
}

export function useCreateCollection() {
  return useCollectionChange(async (input: CollectionCreateInput) => readDetail(await http.post<unknown>('/api/collections', input), '/api/collections'));
}

export function useUpdateCollection() {
  return useCollectionChange(async ({ collectionId, input }: { collectionId: number; input: CollectionUpdateInput }) =>
    readDetail(await http.put<unknown>(`/api/collections/${collectionId}`, input), `/api/collections/${collectionId}`),
  );
}

export function useArchiveCollection() {
  return useCollectionChange(async ({ collectionId, archive }: { collectionId: number; archive: boolean }) =>
    readDetail(await http.post<unknown>(`/api/collections/${collectionId}/${archive ? 'archive' : 'restore'}`), `/api/collections/${collectionId}`),
  );
}
