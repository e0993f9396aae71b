import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SubjectCreateInput, SubjectMove, SubjectUpdateInput } from '../../../common/schemas/subject.ts';
import { http, unexpectedShape } from './http';
import { csrfTokensFrom, sendForm } from './intake';
import { queryKeys } from './query-keys';
import type { ModelSummary, SubjectHistoryEntry } from '../../../common/api/subjects.ts';

/**
 * The subject studio's API: a collection's vocabulary (subjects and form terms in a tree), one subject with
 * its examples, the items it would catch, the estimate at a threshold, and its model versions.
 */

export type SubjectKind = 'subject' | 'form';
export type SubjectStatus = 'draft' | 'active' | 'retired';
export type ExampleMedium = 'sketch' | 'illustration' | 'photo';
export type { MadeFrom, ModelSummary, QualityRecord, SubjectHistoryEntry, SynthesisMethod } from '../../../common/api/subjects.ts';

export interface SubjectListEntry {
  id: number;
  prefLabel: string;
  kind: SubjectKind;
  broaderId: number | null;
  status: SubjectStatus;
  notation: string | null;
  altTextPhrase: string | null;
  altLabels: string[];
  feedsAltText: boolean;
  conceptUri: string;
  version: number;
  examples: number;
  model: ModelSummary | null;
}

export interface SubjectRecord {
  id: number;
  collectionId: number;
  prefLabel: string;
  altLabels: string[];
  kind: SubjectKind;
  broaderId: number | null;
  notation: string | null;
  scopeNote: string | null;
  altTextPhrase: string | null;
  status: SubjectStatus;
  version: number;
  feedsAltText: boolean;
  conceptUri: string;
}

export interface Example {
  id: number;
  subjectId: number;
  medium: ExampleMedium;
  origin: 'drawn' | 'uploaded' | 'promoted';
  itemId: number | null;
  createdAt: string;
  imageUrl: string;
}

export interface SubjectDetail {
  subject: SubjectRecord;
  examples: Example[];
  model: ModelSummary | null;
  judgements: { confirmed: number; rejected: number };
}

export interface PreviewItem {
  itemId: number;
  identifier: string;
  fileName: string;
  caption: string | null;
  score: number;
  z: number;
  probability: number | null;
  judgement: 'confirmed' | 'rejected' | null;
}

export interface Preview {
  subjectId: number;
  model: ModelSummary | null;
  scored: number;
  items: PreviewItem[];
}

export interface Interval {
  low: number;
  high: number;
}

export interface Estimate {
  subjectId: number;
  minZ: number;
  probabilityAtThreshold: number | null;
  minimumJudged: number;
  judged: { confirmed: number; rejected: number };
  enough: boolean;
  reason: string | null;
  counts: { truePositives: number; falsePositives: number; falseNegatives: number } | null;
  precision: number | null;
  precisionInterval: Interval | null;
  recall: number | null;
  recallInterval: Interval | null;
  modelVersion: number | null;
}

export type SynthesisRequest = { mode: 'from-examples' } | { mode: 'narrower'; broaderSubjectId?: number } | { mode: 'carried'; sourceSubjectId: number };

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

function member<T>(body: unknown, key: string, path: string, what: string, check: (v: unknown) => boolean = isRecord): T {
  const value = isRecord(body) ? body[key] : undefined;
  if (!check(value)) throw unexpectedShape(path, what);
  return value as T;
}

// ------------------------------------------------------------------ reading

export async function getSubjects(collectionId: number, signal?: AbortSignal): Promise<SubjectListEntry[]> {
  const path = `/api/collections/${collectionId}/subjects`;
  return member<SubjectListEntry[]>(await http.get<unknown>(path, { signal }), 'subjects', path, 'a list of subjects', Array.isArray);
}

export function useSubjects(collectionId: number | null) {
  return useQuery(
    queryOptions({
      queryKey: queryKeys.studio.subjects(collectionId ?? 0),
      queryFn: ({ signal }) => getSubjects(collectionId!, signal),
      enabled: collectionId !== null,
    }),
  );
}

export async function getSubject(subjectId: number, signal?: AbortSignal): Promise<SubjectDetail> {
  const path = `/api/subjects/${subjectId}`;
  const body = await http.get<unknown>(path, { signal });
  if (!isRecord(body) || !isRecord(body.subject) || !Array.isArray(body.examples)) throw unexpectedShape(path, 'a subject');
  return body as unknown as SubjectDetail;
}

export function useSubject(subjectId: number | null) {
  return useQuery(queryOptions({ queryKey: queryKeys.studio.subject(subjectId ?? 0), queryFn: ({ signal }) => getSubject(subjectId!, signal), enabled: subjectId !== null }));
}

/** The items the subject ranks highest, at or above the threshold (z against the collection's scores). */
export function usePreview(subjectId: number, minZ: number, enabled: boolean) {
  return useQuery({
    queryKey: queryKeys.studio.preview(subjectId, minZ),
    queryFn: async ({ signal }) => {
      const path = `/api/subjects/${subjectId}/preview?topN=24&minZ=${minZ}`;
      const body = await http.get<unknown>(path, { signal });
      if (!isRecord(body) || !Array.isArray(body.items)) throw unexpectedShape(path, 'a ranked preview');
      return body as unknown as Preview;
    },
    enabled,
    placeholderData: keepPreviousData,
  });
}

export function useEstimate(subjectId: number, minZ: number, enabled: boolean) {
  return useQuery({
    queryKey: queryKeys.studio.estimate(subjectId, minZ),
    queryFn: async ({ signal }) => {
      const path = `/api/subjects/${subjectId}/estimate?minZ=${minZ}`;
      return member<Estimate>(await http.get<unknown>(path, { signal }), 'estimate', path, 'an estimate');
    },
    enabled,
    placeholderData: keepPreviousData,
  });
}

/** Who changed the subject, its examples and its model versions in the studio, newest first. */
export function useSubjectHistory(subjectId: number) {
  return useQuery({
    queryKey: queryKeys.studio.history(subjectId),
    queryFn: async ({ signal }) => {
      const path = `/api/subjects/${subjectId}/history`;
      return member<SubjectHistoryEntry[]>(await http.get<unknown>(path, { signal }), 'history', path, 'the subject’s history', Array.isArray);
    },
  });
}

export function useModels(subjectId: number) {
  return useQuery({
    queryKey: queryKeys.studio.models(subjectId),
    queryFn: async ({ signal }) => {
      const path = `/api/subjects/${subjectId}/models`;
      return member<ModelSummary[]>(await http.get<unknown>(path, { signal }), 'models', path, 'a list of model versions', Array.isArray);
    },
  });
}

// ------------------------------------------------------------------ changing

/** After any change to a subject, its preview, estimate, models and the collection's tree are asked for again. */
function useRefreshSubject() {
  const queryClient = useQueryClient();
  return (subjectId: number | null) => {
    void queryClient.invalidateQueries({ queryKey: [...queryKeys.studio.all, 'subjects'] });
    void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
    if (subjectId !== null) {
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.subject(subjectId) });
      void queryClient.invalidateQueries({ queryKey: [...queryKeys.studio.all, 'preview', subjectId] });
      void queryClient.invalidateQueries({ queryKey: [...queryKeys.studio.all, 'estimate', subjectId] });
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.models(subjectId) });
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.history(subjectId) });
    }
  };
}

export function useCreateSubject() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ collectionId, subject }: { collectionId: number; subject: SubjectCreateInput }) => {
      const path = `/api/collections/${collectionId}/subjects`;
      return member<SubjectRecord>(await http.post<unknown>(path, subject), 'subject', path, 'the new subject');
    },
    onSuccess: () => refresh(null),
  });
}

export function useUpdateSubject() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ subjectId, subject }: { subjectId: number; subject: SubjectUpdateInput }) => {
      const path = `/api/subjects/${subjectId}`;
      return member<SubjectRecord>(await http.put<unknown>(path, subject), 'subject', path, 'the saved subject');
    },
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}

export function useMoveSubject() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ subjectId, move }: { subjectId: number; move: SubjectMove }) => {
      const path = `/api/subjects/${subjectId}/move`;
      return member<SubjectRecord>(await http.post<unknown>(path, move), 'subject', path, 'the moved subject');
    },
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}

/** Uploads examples of one medium (many files at once); each is read (embedded) by the server before it answers. */
export function useAddExamples() {
  const queryClient = useQueryClient();
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ subjectId, files, medium }: { subjectId: number; files: File[]; medium: ExampleMedium }) => {
      const form = new FormData();
      form.append('medium', medium);
      for (const f of files) form.append('files', f, f.name);
      const path = `/api/subjects/${subjectId}/examples`;
      return member<Example[]>(await sendForm(path, form, csrfTokensFrom(queryClient)), 'examples', path, 'the new examples', Array.isArray);
    },
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}

export function useRemoveExample() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ exampleId }: { exampleId: number; subjectId: number }) => http.delete<void>(`/api/examples/${exampleId}`),
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}

export function useSynthesize() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ subjectId, request }: { subjectId: number; request: SynthesisRequest }) => {
      const path = `/api/subjects/${subjectId}/models`;
      return member<ModelSummary>(await http.post<unknown>(path, request), 'model', path, 'the new model version');
    },
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}

/** Makes a confirmed item's scan an example (photo) of the subject (the review desk's promotion route). */
export function usePromoteItem() {
  const refresh = useRefreshSubject();
  return useMutation({
    mutationFn: async ({ itemId, subjectId }: { itemId: number; subjectId: number }) => http.post<{ exampleId: number; created: boolean }>(`/api/review/items/${itemId}/examples`, { subjectId }),
    onSettled: (_data, _error, { subjectId }) => refresh(subjectId),
  });
}
