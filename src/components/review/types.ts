// Answers of the review endpoints as the review islands use them.
import { REVIEW_STATE_WORDS } from '~/lib/vocab';
import type { NoteView } from '~/lib/review/notes';
import type { SceneChange } from '~/lib/review/diff';
import type { ClientStep, ReviewAction } from '~/lib/review/states';
import type { ClientState } from '~/lib/vocab';

export type { NoteView };

export interface ReviewVersion {
  id: number;
  shotId: number;
  number: number;
  authorId: string | null;
  comment: string | null;
  reviewState: 'draft' | 'submitted' | 'approved' | 'returned' | 'superseded';
  bakeState: string;
  sharedWithClient: boolean;
  /** The client's sign-off, apart from the review state. */
  clientState: ClientState;
  clientSentAt: string | null;
  clientDecidedAt: string | null;
  clientDecidedByName: string | null;
  clientComment: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface ReviewAnswer {
  version: ReviewVersion;
  events: { id: number; fromState: string; toState: string; comment: string | null; actor: { id: string | null; name: string }; createdAt: string }[];
  actions: ReviewAction[];
  /** The client sign-off steps the viewer may take now. */
  clientSteps: ClientStep[];
  canShare: boolean;
}

export interface NotesAnswer {
  notes: NoteView[];
  carried?: NoteView[];
}

export interface InboxItem {
  versionId: number;
  number: number;
  reviewState: string;
  shotId: number;
  shotCode: string;
  showCode: string;
  author: { id: string | null; name: string };
  updatedAt: string;
  lastEvent: { comment: string | null; actorName: string | null; at: string } | null;
  clientState: ClientState;
  clientDecidedByName: string | null;
  clientComment: string | null;
  clientDecidedAt: string | null;
  notes?: NoteView[];
  /** A version sent back that a newer one superseded: the newest version of the shot saved since (not submitted yet). */
  nextVersion?: { id: number; number: number; reviewState: string } | null;
  /** When what asks for the reader happened, and whether they have not read it since (opened it or marked it read). */
  at: string;
  unread: boolean;
}

/** A shot assigned to the reader that waits for their blocking. */
export interface InboxAssignment {
  shotId: number;
  shotCode: string;
  showCode: string;
  description: string | null;
  dueDate: string | null;
  assignedBy: string | null;
  at: string;
  unread: boolean;
}

type InboxSections = 'assigned' | 'toReview' | 'returned' | 'newNotes' | 'client';

export interface InboxAnswer {
  counts: Record<InboxSections | 'total', number>;
  /** Items the reader has not read since they asked for something (opened, or marked read), per section. */
  unread: Record<InboxSections | 'total', number>;
  assigned: InboxAssignment[];
  toReview: InboxItem[];
  returned: InboxItem[];
  newNotes: (InboxItem & { notes: NoteView[] })[];
  /** A client: versions waiting for their sign-off; the studio: the client's recent decisions. */
  client: InboxItem[];
}

export interface CompareAnswer {
  /** Every version of the shot the reader may see, newest first (the pickers). */
  versions: { id: number; number: number; reviewState: string; bakeState: string; /** it was sent back (before a newer one superseded it) */ sentBack: boolean }[];
  shot: { id: number; code: string; showCode: string | null; firstFrame: number; lastFrame: number; plateFirstFrame: number | null; plateWidth: number; plateHeight: number; metresPerPixel: number | null; plateAssetId: number | null };
  a: ReviewVersion & { scene: unknown; plateAssetId: number | null };
  b: ReviewVersion & { scene: unknown; plateAssetId: number | null };
  changes: SceneChange[];
  counts: Record<SceneChange['kind'], number>;
}

/** Our words for the review states, as shown to people. */
export const STATE_WORDS: Record<string, string> = REVIEW_STATE_WORDS;

export const STATE_TONE: Record<string, string> = {
  draft: 'bg-sand-deep text-ink-soft',
  submitted: 'bg-harbour-50 text-harbour-700',
  approved: 'bg-foam-50 text-foam-600',
  returned: 'bg-coral-50 text-coral-700',
  superseded: 'bg-sand-deep text-ink-muted',
};
