/**
 * The shapes the review desk and catalogue API answers with: the server's services build them, the client's
 * API modules read them. Types only.
 */
import type { Finding } from '../alt-text/index.ts';

export type SuggestionState = 'proposed' | 'accepted' | 'rejected' | 'added';

export interface PanelSubject {
  id: number;
  prefLabel: string;
  altLabels: string[];
  kind: 'subject' | 'form';
  altTextPhrase: string | null;
  feedsAltText: boolean;
  broaderId: number | null;
  broader: Array<{ id: number; prefLabel: string }>;
}

export interface SubjectMatch extends PanelSubject {
  matchedAltLabel: string | null;
}

export interface PanelSuggestion {
  id: number;
  subject: PanelSubject;
  state: SuggestionState | null;
  probability: number | null;
  score: number | null;
  model: { id: number; version: number; method: string } | null;
  decidedBy: { id: number; name: string } | null;
  decidedAt: string | null;
}

export interface ItemPanel {
  item: {
    id: number;
    collectionId: number;
    identifier: string;
    fileName: string;
    caption: string | null;
    creator: string | null;
    dateText: string | null;
    rights: string | null;
    width: number | null;
    height: number | null;
    state: ItemState;
    altText: string | null;
    longDescription: string | null;
    decorative: boolean;
    captionFlagged: boolean;
    captionFlagNote: string | null;
    approvedBy: { id: number; name: string } | null;
    approvedAt: string | null;
    version: number;
    imageUrl: string;
    thumbUrl: string;
  };
  ocr: { text: string | null; confidence: number | null; mostlyText: boolean; readAt: string; engine: string } | null;
  subjects: PanelSuggestion[];
  forms: PanelSuggestion[];
  acceptedForm: PanelSubject | null;
  draft: string;
  findings: Finding[];
  secondReview: { inSample: boolean; status: 'not-in-sample' | 'after-approval' | 'open' | 'done' | 'first-reviewer'; blind: boolean };
}

export interface QueueEntry {
  id: number;
  identifier: string;
  caption: string | null;
  state: string;
  version: number;
  thumbUrl: string;
  proposed: number;
  mostUncertain: { subjectId: number; label: string; probability: number } | null;
  skippedByYou: boolean;
}

export interface GridEntry {
  itemId: number;
  identifier: string;
  caption: string | null;
  version: number;
  thumbUrl: string;
  probability: number | null;
  score: number | null;
  model: { id: number; version: number } | null;
}

export type ItemState = 'new' | 'suggested' | 'approved';

export interface CatalogueRow {
  id: number;
  identifier: string;
  caption: string | null;
  altText: string | null;
  decorative: boolean;
  state: ItemState;
  approvedAt: string | null;
  approvedBy: { id: number; name: string } | null;
  subjects: string[];
  thumbUrl: string;
}

export interface HistoryEntry {
  at: string;
  action: string;
  actor: { id: number; name: string } | null;
  /** what the event says in words */
  summary: string;
  subject: { id: number; label: string } | null;
  /** the subject model version whose suggestion was answered, when there was one */
  model: { id: number; version: number; method: string } | null;
  detail: Record<string, unknown> | null;
}
