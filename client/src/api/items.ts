import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';
import type { CatalogueRow, HistoryEntry, ItemState } from '../../../common/review/types.ts';

export type { CatalogueRow, HistoryEntry, ItemState } from '../../../common/review/types.ts';

/** The catalogue: searching a collection's items, the filters' choices, and one item's record with its history. */


export interface CatalogueFilters {
  collectionId: number;
  q?: string;
  state?: ItemState;
  subjectId?: number;
  reviewerId?: number;
  from?: string;
  to?: string;
  page: number;
  pageSize: number;
}


export interface CatalogueResult {
  items: CatalogueRow[];
  total: number;
  page: number;
  pageSize: number;
  ignoredWords: string[];
}

export interface ItemRecord {
  item: {
    id: number;
    identifier: string;
    fileName: string;
    collection: { id: number; name: string } | null;
    caption: string | null;
    creator: string | null;
    dateText: string | null;
    rights: string | null;
    state: ItemState;
    altText: string | null;
    longDescription: string | null;
    decorative: boolean;
    captionFlagged: boolean;
    captionFlagNote: string | null;
    ocrText: string | null;
    mostlyText: boolean;
    approvedAt: string | null;
    version: number;
    imageUrl: string;
    thumbUrl: string;
    subjects: Array<{ id: number; prefLabel: string; kind: 'subject' | 'form'; state: string }>;
  };
  history: HistoryEntry[];
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export async function searchItems(filters: CatalogueFilters, signal?: AbortSignal): Promise<CatalogueResult> {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(filters)) if (v !== undefined && v !== '') q.set(k, String(v));
  const path = `/api/items?${q.toString()}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.items) || typeof body.total !== 'number') throw unexpectedShape(path, 'a page of items');
  return body as unknown as CatalogueResult;
}

export function catalogueQueryOptions(filters: CatalogueFilters) {
  return queryOptions({ queryKey: queryKeys.items.search({ ...filters }), queryFn: ({ signal }) => searchItems(filters, signal), placeholderData: keepPreviousData });
}

export function useCatalogue(filters: CatalogueFilters | null) {
  return useQuery({ ...catalogueQueryOptions(filters ?? { collectionId: 0, page: 1, pageSize: 1 }), enabled: filters !== null });
}

export async function getFacets(collectionId: number, signal?: AbortSignal): Promise<{ reviewers: Array<{ id: number; name: string }>; subjects: Array<{ id: number; prefLabel: string; kind: string }> }> {
  const path = `/api/items/facets?collectionId=${collectionId}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.reviewers) || !Array.isArray(body.subjects)) throw unexpectedShape(path, 'the catalogue filters');
  return body as { reviewers: Array<{ id: number; name: string }>; subjects: Array<{ id: number; prefLabel: string; kind: string }> };
}

export function facetsQueryOptions(collectionId: number) {
  return queryOptions({ queryKey: queryKeys.items.facets(collectionId), queryFn: ({ signal }) => getFacets(collectionId, signal) });
}

export function useCatalogueFacets(collectionId: number | null) {
  return useQuery({ ...facetsQueryOptions(collectionId ?? 0), enabled: collectionId !== null });
}

export async function getItemRecord(itemId: number, signal?: AbortSignal): Promise<ItemRecord> {
  const path = `/api/items/${itemId}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !isRecord(body.item) || !Array.isArray(body.history)) throw unexpectedShape(path, "an item's record");
  return body as unknown as ItemRecord;
}

export function itemRecordQueryOptions(itemId: number) {
  return queryOptions({ queryKey: queryKeys.items.record(itemId), queryFn: ({ signal }) => getItemRecord(itemId, signal) });
}

export function useItemRecord(itemId: number) {
  return useQuery(itemRecordQueryOptions(itemId));
}
