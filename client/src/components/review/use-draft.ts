import { useCallback, useMemo, useState } from 'react';
import type { DescriptionValues } from '../../api/review';

/** What an editor typed for one item and has not saved yet, kept in this browser so a reload loses nothing. */
export interface StoredDraft extends DescriptionValues {
  /** the item version the text was typed against */
  baseVersion: number;
  savedAt: string;
}

const key = (itemId: number) => `cartouche:review-draft:${itemId}`;

export function readDraft(itemId: number): StoredDraft | null {
  try {
    const raw = window.localStorage.getItem(key(itemId));
    if (!raw) return null;
    const d = JSON.parse(raw) as Partial<StoredDraft>;
    if (typeof d.altText !== 'string' || typeof d.longDescription !== 'string' || typeof d.decorative !== 'boolean' || typeof d.baseVersion !== 'number') return null;
    return d as StoredDraft;
  } catch {
    return null;
  }
}

export function writeDraft(itemId: number, draft: DescriptionValues, baseVersion: number): void {
  try {
    window.localStorage.setItem(key(itemId), JSON.stringify({ ...draft, baseVersion, savedAt: new Date().toISOString() } satisfies StoredDraft));
  } catch {
    // storage full or switched off: the text stays in the page
  }
}

export function clearDraft(itemId: number): void {
  try {
    window.localStorage.removeItem(key(itemId));
  } catch {
    // nothing to clear
  }
}

/**
 * The alt text, long description and decorative flag being edited for one item. Starts from this browser's
 * unsaved draft when there is one, else from what is stored, else from the composed draft; until the editor
 * types, the composed draft follows the subjects they accept.
 */
export function useDescriptionDraft(itemId: number, stored: DescriptionValues & { hasStored: boolean }, composed: string, version: number) {
  const [restored] = useState(() => readDraft(itemId));
  const [own, setOwn] = useState<DescriptionValues | null>(() =>
    restored ? { altText: restored.altText, longDescription: restored.longDescription, decorative: restored.decorative } : stored.hasStored ? stored : null,
  );
  const touched = own !== null;
  // until the editor types, the field shows the composed draft, which follows the subjects they accept
  const values = useMemo<DescriptionValues>(() => own ?? { altText: composed, longDescription: stored.longDescription, decorative: false }, [own, composed, stored.longDescription]);

  const change = useCallback(
    (patch: Partial<DescriptionValues>) => {
      const next = { ...values, ...patch };
      writeDraft(itemId, next, version);
      setOwn(next);
    },
    [itemId, version, values],
  );

  const reset = useCallback(
    (to: DescriptionValues) => {
      clearDraft(itemId);
      setOwn(to);
    },
    [itemId],
  );

  return { values, change, reset, restored, touched };
}
