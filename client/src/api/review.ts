import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Finding } from '../../../common/alt-text/index.ts';
import type { GridEntry, ItemPanel, PanelSubject, QueueEntry, SubjectMatch } from '../../../common/review/types.ts';
import { http, unexpectedShape } from './http';
import { queryKeys } from './query-keys';

export type { GridEntry, ItemPanel, PanelSubject, PanelSuggestion, QueueEntry, SubjectMatch, SuggestionState } from '../../../common/review/types.ts';

/**
 * The review desk: the item queue, one item's panel, the decisions on it, the subject grid, blind second
 * reviews, and the collection's agreement figures. Every decision answers with the item's panel as it now is
 * (with its new version), which replaces the cached one.
 */






export interface QueueFilters {
  collectionId: number;
  subjectId?: number;
  state: 'open' | 'new' | 'suggested' | 'approved';
  minProbability?: number;
  maxProbability?: number;
  notReviewed?: boolean;
  sort: 'uncertainty' | 'identifier';
  offset: number;
  limit: number;
}


export interface DescriptionValues {
  altText: string;
  longDescription: string;
  decorative: boolean;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function readPanel(body: unknown, path: string): ItemPanel {
  if (!isRecord(body) || !isRecord(body.item) || !Array.isArray(body.subjects) || !Array.isArray(body.forms)) throw unexpectedShape(path, "an item's review panel");
  return body as unknown as ItemPanel;
}

function query(params: Record<string, string | number | boolean | undefined>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') q.set(k, String(v));
  return q.toString();
}

// ------------------------------------------------------------------ queue and panel

export async function getQueue(filters: QueueFilters, signal?: AbortSignal): Promise<{ items: QueueEntry[]; total: number }> {
  const path = `/api/review/queue?${query({ ...filters })}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.items) || typeof body.total !== 'number') throw unexpectedShape(path, 'the review queue');
  return body as { items: QueueEntry[]; total: number };
}

export function queueQueryOptions(filters: QueueFilters) {
  return queryOptions({ queryKey: queryKeys.review.queue({ ...filters }), queryFn: ({ signal }) => getQueue(filters, signal), placeholderData: keepPreviousData });
}

export function useReviewQueue(filters: QueueFilters | null) {
  return useQuery({ ...queueQueryOptions(filters ?? { collectionId: 0, state: 'open', sort: 'uncertainty', offset: 0, limit: 1 }), enabled: filters !== null });
}

export async function getItemPanel(itemId: number, blind: boolean, signal?: AbortSignal): Promise<ItemPanel> {
  const path = `/api/review/items/${itemId}${blind ? '?blind=1' : ''}`;
  return readPanel(await http.get<unknown>(path, { signal }), path);
}

export function itemPanelQueryOptions(itemId: number, blind = false) {
  return queryOptions({ queryKey: queryKeys.review.item(itemId, blind), queryFn: ({ signal }) => getItemPanel(itemId, blind, signal) });
}

export function useItemPanel(itemId: number | null, blind = false) {
  return useQuery({ ...itemPanelQueryOptions(itemId ?? 0, blind), enabled: itemId !== null });
}

/** Every decision returns the panel: it replaces the cached one, and the queue and catalogue are refreshed. */
function usePanelMutation<V>(fn: (vars: V) => Promise<ItemPanel>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (panel) => {
      queryClient.setQueryData(queryKeys.review.item(panel.item.id, false), panel);
      void queryClient.invalidateQueries({ queryKey: queryKeys.items.all });
    },
  });
}

export async function decideSubject(vars: { itemId: number; version: number; subjectId: number; decision: 'accept' | 'reject' | 'undo' }): Promise<ItemPanel> {
  const path = `/api/review/items/${vars.itemId}/subjects`;
  return readPanel(await http.post<unknown>(path, { version: vars.version, subjectId: vars.subjectId, decision: vars.decision }), path);
}
export const useDecideSubject = () => usePanelMutation(decideSubject);

export async function setForm(vars: { itemId: number; version: number; subjectId: number | null }): Promise<ItemPanel> {
  const path = `/api/review/items/${vars.itemId}/form`;
  return readPanel(await http.put<unknown>(path, { version: vars.version, subjectId: vars.subjectId }), path);
}
export const useSetForm = () => usePanelMutation(setForm);

export async function saveDescription(vars: { itemId: number; version: number } & DescriptionValues): Promise<ItemPanel> {
  const path = `/api/review/items/${vars.itemId}/description`;
  return readPanel(await http.put<unknown>(path, { version: vars.version, altText: vars.altText, longDescription: vars.longDescription, decorative: vars.decorative }), path);
}
export const useSaveDescription = () => usePanelMutation(saveDescription);

export async function approveItem(vars: { itemId: number; version: number } & DescriptionValues): Promise<{ panel: ItemPanel; warnings: Finding[]; rejected: number }> {
  const path = `/api/review/items/${vars.itemId}/approve`;
  const body = await http.post<unknown>(path, { version: vars.version, altText: vars.altText, longDescription: vars.longDescription, decorative: vars.decorative });
  if (!isRecord(body)) throw unexpectedShape(path, 'the approved item');
  return { panel: readPanel(body.panel, path), warnings: (body.warnings as Finding[]) ?? [], rejected: Number(body.rejected ?? 0) };
}
export function useApproveItem() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: approveItem,
    onSuccess: ({ panel }) => {
      queryClient.setQueryData(queryKeys.review.item(panel.item.id, false), panel);
      void queryClient.invalidateQueries({ queryKey: queryKeys.items.all });
      void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
    },
  });
}

export async function flagCaption(vars: { itemId: number; version: number; flagged: boolean; note: string }): Promise<ItemPanel> {
  const path = `/api/review/items/${vars.itemId}/caption-flag`;
  return readPanel(await http.put<unknown>(path, { version: vars.version, flagged: vars.flagged, note: vars.note }), path);
}
export const useFlagCaption = () => usePanelMutation(flagCaption);

export async function readTextNow(vars: { itemId: number }): Promise<ItemPanel> {
  const path = `/api/review/items/${vars.itemId}/ocr`;
  return readPanel(await http.post<unknown>(path), path);
}
export const useReadTextNow = () => usePanelMutation(readTextNow);

export async function skipItem(itemId: number): Promise<void> {
  await http.post<unknown>(`/api/review/items/${itemId}/skip`);
}
export function useSkipItem() {
  return useMutation({ mutationFn: skipItem });
}

export async function promoteToExample(vars: { itemId: number; subjectId: number }): Promise<{ exampleId: number; created: boolean }> {
  const path = `/api/review/items/${vars.itemId}/examples`;
  const body = await http.post<unknown>(path, { subjectId: vars.subjectId });
  if (!isRecord(body) || typeof body.exampleId !== 'number') throw unexpectedShape(path, 'the new example');
  return { exampleId: body.exampleId, created: Boolean(body.created) };
}
export function usePromoteToExample() {
  return useMutation({ mutationFn: promoteToExample });
}

// ------------------------------------------------------------------ vocabulary

export async function searchSubjects(collectionId: number, q: string, kind: '' | 'subject' | 'form', signal?: AbortSignal): Promise<SubjectMatch[]> {
  const path = `/api/review/subjects?${query({ collectionId, q, kind: kind || undefined, limit: kind === 'form' || q === '' ? 50 : 10 })}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.subjects)) throw unexpectedShape(path, 'a list of subjects');
  return body.subjects as SubjectMatch[];
}

export function subjectSearchQueryOptions(collectionId: number, q: string, kind: '' | 'subject' | 'form') {
  return queryOptions({ queryKey: queryKeys.review.subjects(collectionId, q, kind), queryFn: ({ signal }) => searchSubjects(collectionId, q, kind, signal), staleTime: 60_000, placeholderData: keepPreviousData });
}

export function useSubjectSearch(collectionId: number | null, q: string, kind: '' | 'subject' | 'form' = '') {
  return useQuery({ ...subjectSearchQueryOptions(collectionId ?? 0, q, kind), enabled: collectionId !== null });
}

// ------------------------------------------------------------------ subject grid


export async function getSubjectGrid(subjectId: number, signal?: AbortSignal): Promise<{ subject: PanelSubject; items: GridEntry[]; waiting: number }> {
  const path = `/api/review/subjects/${subjectId}/grid`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.items)) throw unexpectedShape(path, "a subject's ranked items");
  return body as { subject: PanelSubject; items: GridEntry[]; waiting: number };
}

export function subjectGridQueryOptions(subjectId: number) {
  return queryOptions({ queryKey: queryKeys.review.grid(subjectId), queryFn: ({ signal }) => getSubjectGrid(subjectId, signal) });
}

export function useSubjectGrid(subjectId: number | null) {
  return useQuery({ ...subjectGridQueryOptions(subjectId ?? 0), enabled: subjectId !== null });
}

export async function decideGrid(vars: { subjectId: number; decisions: Array<{ itemId: number; version: number; decision: 'accept' | 'reject' }> }): Promise<{ decided: number }> {
  const path = `/api/review/subjects/${vars.subjectId}/grid`;
  const body = await http.post<unknown>(path, { decisions: vars.decisions });
  if (!isRecord(body) || typeof body.decided !== 'number') throw unexpectedShape(path, 'the number of decisions saved');
  return { decided: body.decided };
}

export function useDecideGrid() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: decideGrid,
    onSettled: () => void queryClient.invalidateQueries({ queryKey: queryKeys.review.all }),
  });
}

// ------------------------------------------------------------------ second reviews and agreement

export async function getSecondReviews(collectionId: number, signal?: AbortSignal): Promise<{ items: Array<{ id: number; identifier: string; thumbUrl: string }>; total: number; share: number }> {
  const path = `/api/review/collections/${collectionId}/second-reviews`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.items)) throw unexpectedShape(path, 'the items waiting for a second review');
  return body as { items: Array<{ id: number; identifier: string; thumbUrl: string }>; total: number; share: number };
}

export function secondReviewsQueryOptions(collectionId: number) {
  return queryOptions({ queryKey: queryKeys.review.secondReviews(collectionId), queryFn: ({ signal }) => getSecondReviews(collectionId, signal) });
}

export function useSecondReviews(collectionId: number | null) {
  return useQuery({ ...secondReviewsQueryOptions(collectionId ?? 0), enabled: collectionId !== null });
}

export async function recordSecondReview(vars: { itemId: number; present: number[]; absent: number[] }): Promise<{ id: number }> {
  const path = `/api/review/items/${vars.itemId}/second-review`;
  const body = await http.post<unknown>(path, { present: vars.present, absent: vars.absent });
  if (!isRecord(body) || typeof body.id !== 'number') throw unexpectedShape(path, 'the recorded second review');
  return { id: body.id };
}

export function useRecordSecondReview() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: recordSecondReview, onSuccess: () => void queryClient.invalidateQueries({ queryKey: queryKeys.review.all }) });
}

export interface Agreement {
  doubleReviewShare: number;
  perSubject: Array<{ subjectId: number; label: string; items: number; kappa: number | null }>;
  perPair: Array<{ editorA: { id: number; name: string }; editorB: { id: number; name: string }; items: number; kappa: number | null }>;
}

export async function getAgreement(collectionId: number, signal?: AbortSignal): Promise<Agreement> {
  const path = `/api/review/collections/${collectionId}/agreement`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !Array.isArray(body.perSubject) || !Array.isArray(body.perPair)) throw unexpectedShape(path, 'the agreement figures');
  return body as unknown as Agreement;
}

export function agreementQueryOptions(collectionId: number) {
  return queryOptions({ queryKey: queryKeys.review.agreement(collectionId), queryFn: ({ signal }) => getAgreement(collectionId, signal) });
}

export function useAgreement(collectionId: number | null) {
  return useQuery({ ...agreementQueryOptions(collectionId ?? 0), enabled: collectionId !== null });
}

export async function saveReviewSettings(vars: { collectionId: number; doubleReviewShare: number }): Promise<{ doubleReviewShare: number }> {
  const path = `/api/review/collections/${vars.collectionId}/settings`;
  const body = await http.put<unknown>(path, { doubleReviewShare: vars.doubleReviewShare });
  if (!isRecord(body) || typeof body.doubleReviewShare !== 'number') throw unexpectedShape(path, 'the review settings');
  return { doubleReviewShare: body.doubleReviewShare };
}

export function useSaveReviewSettings() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: saveReviewSettings, onSuccess: (_r, vars) => void queryClient.invalidateQueries({ queryKey: queryKeys.review.agreement(vars.collectionId) }) });
}
