import { useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useEffect, useState, useSyncExternalStore } from 'react';
import { csrfTokensFrom, scansAdded, uploadScan, type UploadOutcome } from '../../api/intake';
import { problemOf } from '../../api/http';
import { formatBytes } from '../../lib/format';

/** How many files are on their way at once: enough to keep the line busy, few enough to keep their order. */
const CONCURRENT = 2;

export type EntryState = 'waiting' | 'sending' | 'checking' | 'done' | 'not-sent' | 'cancelled';

export interface UploadEntry {
  id: number;
  file: File;
  collectionId: number;
  collectionName: string;
  state: EntryState;
  /** bytes of this file sent so far */
  sent: number;
  /** the server's answer once it has handled the file */
  outcome: UploadOutcome | null;
  /** why the file never reached the server or got no answer (network, refused request, too large to send) */
  problem: string | null;
  /** sending again may help (a network or server failure); a refusal of the file itself does not qualify */
  retryable: boolean;
}

const ACTIVE: readonly EntryState[] = ['waiting', 'sending', 'checking'];
export const isActive = (e: UploadEntry) => ACTIVE.includes(e.state);

/**
 * The browser side of intake: files wait in a list and go to the server one request each, two at a time, so
 * each has its own progress and its own answer; they can be cancelled until they are handled, and sent again
 * when the network or the server failed. Files larger than the server accepts are refused without sending.
 */
export class UploadQueue {
  private entries: UploadEntry[] = [];
  private readonly listeners = new Set<() => void>();
  private readonly controllers = new Map<number, AbortController>();
  private nextId = 1;

  constructor(
    private readonly queryClient: QueryClient,
    private maxFileBytes: number | undefined,
  ) {}

  subscribe = (listener: () => void): (() => void) => {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  };

  getSnapshot = (): UploadEntry[] => this.entries;

  setMaxFileBytes(max: number | undefined): void {
    this.maxFileBytes = max;
  }

  add(files: File[], collectionId: number, collectionName: string): void {
    const max = this.maxFileBytes;
    const added = files.map((file): UploadEntry => {
      const base: UploadEntry = { id: this.nextId++, file, collectionId, collectionName, state: 'waiting', sent: 0, outcome: null, problem: null, retryable: false };
      if (max !== undefined && file.size > max) {
        return { ...base, state: 'not-sent', problem: `The file is ${formatBytes(file.size)}; Cartouche takes scans of up to ${formatBytes(max)}. It was not sent.` };
      }
      if (file.size === 0) return { ...base, state: 'not-sent', problem: 'The file is empty (0 bytes), or it is a folder: choose the scans inside a folder rather than the folder itself.' };
      return base;
    });
    this.set([...this.entries, ...added]);
    this.pump();
  }

  cancel(id: number): void {
    const controller = this.controllers.get(id);
    if (controller) controller.abort();
    else this.patch(id, { state: 'cancelled' });
    this.pump();
  }

  retry(id: number): void {
    this.patch(id, { state: 'waiting', sent: 0, problem: null, outcome: null, retryable: false });
    this.pump();
  }

  clearSettled(): void {
    this.set(this.entries.filter(isActive));
  }

  /** Stops everything still on its way (the screen is closing). */
  dispose(): void {
    for (const c of this.controllers.values()) c.abort();
  }

  private set(entries: UploadEntry[]): void {
    this.entries = entries;
    for (const l of this.listeners) l();
  }

  private patch(id: number, change: Partial<UploadEntry>): void {
    this.set(this.entries.map((e) => (e.id === id ? { ...e, ...change } : e)));
  }

  private pump(): void {
    const busy = this.entries.filter((e) => e.state === 'sending' || e.state === 'checking').length;
    for (const entry of this.entries.filter((e) => e.state === 'waiting').slice(0, Math.max(0, CONCURRENT - busy))) this.start(entry);
  }

  private start(entry: UploadEntry): void {
    const controller = new AbortController();
    this.controllers.set(entry.id, controller);
    this.patch(entry.id, { state: 'sending', sent: 0 });
    uploadScan(entry.collectionId, entry.file, csrfTokensFrom(this.queryClient), {
      signal: controller.signal,
      onProgress: (sent) => this.patch(entry.id, { sent }),
      onSent: () => this.patch(entry.id, { state: 'checking', sent: entry.file.size }),
    })
      .then((outcome) => {
        this.patch(entry.id, { state: 'done', outcome, retryable: outcome.outcome === 'failed' });
        if (outcome.outcome === 'ingested') scansAdded(this.queryClient);
      })
      .catch((error: unknown) => {
        if (error instanceof DOMException && error.name === 'AbortError') return this.patch(entry.id, { state: 'cancelled' });
        const problem = problemOf(error);
        this.patch(entry.id, { state: 'not-sent', problem: problem.detail || problem.title, retryable: problem.status === 0 || problem.status >= 500 });
      })
      .finally(() => {
        this.controllers.delete(entry.id);
        this.pump();
      });
  }
}

export interface QueueTotals {
  /** files in the list, cancelled ones left out */
  files: number;
  settled: number;
  active: number;
  bytes: number;
  sentBytes: number;
  ingested: number;
  duplicate: number;
  refused: number;
  cancelled: number;
}

export function totalsOf(entries: UploadEntry[]): QueueTotals {
  const counted = entries.filter((e) => e.state !== 'cancelled');
  return {
    files: counted.length,
    settled: counted.filter((e) => !isActive(e)).length,
    active: entries.filter(isActive).length,
    bytes: counted.reduce((n, e) => n + e.file.size, 0),
    sentBytes: counted.reduce((n, e) => n + (e.state === 'waiting' ? 0 : e.state === 'sending' ? e.sent : e.file.size), 0),
    ingested: entries.filter((e) => e.outcome?.outcome === 'ingested').length,
    duplicate: entries.filter((e) => e.outcome?.outcome === 'duplicate').length,
    refused: entries.filter((e) => e.state === 'not-sent' || e.outcome?.outcome === 'rejected' || e.outcome?.outcome === 'failed').length,
    cancelled: entries.filter((e) => e.state === 'cancelled').length,
  };
}

/** One sentence for when every file in the list is settled, e.g. "All 3 files are done: 2 added, 1 not added." */
export function completionSentence(t: QueueTotals): string {
  const parts: string[] = [];
  if (t.ingested) parts.push(`${t.ingested} added`);
  if (t.duplicate) parts.push(`${t.duplicate} already in the collection`);
  if (t.refused) parts.push(`${t.refused} not added`);
  if (t.cancelled) parts.push(`${t.cancelled} cancelled`);
  const all = t.files + t.cancelled;
  return `${all === 1 ? 'The file is' : `All ${all} files are`} done: ${parts.join(', ') || 'nothing to report'}.`;
}

/** The queue of this screen, its entries and totals; what is still on its way is cancelled when the screen closes. */
export function useUploadQueue(maxFileBytes: number | undefined) {
  const queryClient = useQueryClient();
  const [queue] = useState(() => new UploadQueue(queryClient, maxFileBytes));
  useEffect(() => queue.setMaxFileBytes(maxFileBytes), [queue, maxFileBytes]);
  useEffect(() => () => queue.dispose(), [queue]);
  const entries = useSyncExternalStore(queue.subscribe, queue.getSnapshot);
  const totals = totalsOf(entries);
  // Derived, not stored: empty while anything is on its way, the summary once all is settled. The live
  // region that shows it announces the change from empty to the summary.
  const announcement = entries.length > 0 && totals.active === 0 ? completionSentence(totals) : '';
  return { queue, entries, totals, announcement };
}
