import type { ImportColumn, PreviewRow } from '../../api/intake';
import { formatCount } from '../../lib/format';

export const fieldLabels: Record<ImportColumn, string> = {
  identifier: 'Identifier',
  fileName: 'File name',
  caption: 'Caption',
  creator: 'Creator',
  dateText: 'Date',
  rights: 'Rights',
};

export const formatLabels: Record<string, string> = { jpeg: 'JPEG', png: 'PNG', tiff: 'TIFF', webp: 'WebP' };

export function plural(n: number, one: string, many: string): string {
  return `${formatCount(n)} ${n === 1 ? one : many}`;
}

/** "JPEG, PNG, TIFF or WebP" */
export function orList(words: string[]): string {
  if (words.length <= 1) return words.join('');
  return `${words.slice(0, -1).join(', ')} or ${words[words.length - 1]}`;
}

export const rowStatusWords: Record<PreviewRow['status'], string> = {
  change: 'Will change',
  unchanged: 'Already matches',
  problem: 'Problem',
};

export function matchedByWords(by: PreviewRow['matchedBy']): string {
  return by === null ? '' : `matched by ${by}`;
}
