import { useMutation, useQueryClient } from '@tanstack/react-query';
import { unexpectedShape } from './http';
import { csrfTokensFrom, sendForm } from './intake';
import { queryKeys } from './query-keys';

/** Vocabulary exchange: SKOS (Turtle) and CSV downloads, and imports that land whole or not at all. */

export type ExchangeFormat = 'turtle' | 'csv';

export function vocabularyDownloadUrl(collectionId: number, format: ExchangeFormat): string {
  return `/api/collections/${collectionId}/vocabulary?format=${format}`;
}

export interface ImportReport {
  dryRun: boolean;
  concepts: number;
  created: number;
  updated: number;
  untouched: number;
  warnings: string[];
}

export function useImportVocabulary() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ collectionId, file, format, dryRun }: { collectionId: number; file: File; format: ExchangeFormat; dryRun: boolean }) => {
      const form = new FormData();
      form.append('format', format);
      form.append('dryRun', String(dryRun));
      form.append('file', file, file.name);
      const path = `/api/collections/${collectionId}/vocabulary`;
      const body = await sendForm(path, form, csrfTokensFrom(queryClient));
      const report = typeof body === 'object' && body !== null ? (body as { report?: unknown }).report : undefined;
      if (typeof report !== 'object' || report === null) throw unexpectedShape(path, 'an import report');
      return report as ImportReport;
    },
    onSuccess: (report, { collectionId }) => {
      if (report.dryRun) return;
      void queryClient.invalidateQueries({ queryKey: queryKeys.studio.subjects(collectionId) });
      void queryClient.invalidateQueries({ queryKey: queryKeys.collections.all });
    },
  });
}
