// Tidemark's own words for roles and states, shared by the database schema, the API and the browser.

/** A version number as Tidemark shows it everywhere (screens, e-mails, file names, slate): three digits, "v001". */
export const versionLabel = (n: number) => `v${String(n).padStart(3, '0')}`;

export const ROLES = ['owner', 'supervisor', 'artist', 'client'] as const;
export type Role = (typeof ROLES)[number];

export const SHOT_STATUSES = ['blocking', 'in review', 'approved', 'on hold', 'omitted'] as const;
export type ShotStatus = (typeof SHOT_STATUSES)[number];

export const REVIEW_STATES = ['draft', 'submitted', 'approved', 'returned', 'superseded'] as const;
export type ReviewState = (typeof REVIEW_STATES)[number];

/** One set of words for the review states, on every screen, e-mail and slate. */
export const REVIEW_STATE_WORDS: Record<ReviewState, string> = {
  draft: 'Draft',
  submitted: 'Waiting for review',
  approved: 'Approved by us',
  returned: 'Back for changes',
  superseded: 'Replaced by a newer version',
};

/** The words for a review state id ('' → the id itself when unknown). */
export const reviewStateWord = (state: string) => REVIEW_STATE_WORDS[state as ReviewState] ?? state;

/**
 * The client's sign-off of a version, kept apart from the studio's own review state: a supervisor asks for it once the
 * version is approved by us, then the client (signed in, or a guest through the share link) signs off or asks for
 * changes.
 */
export const CLIENT_STATES = ['not sent', 'waiting', 'signed off', 'changes asked'] as const;
export type ClientState = (typeof CLIENT_STATES)[number];

/** One set of words for the client's sign-off, on every screen, e-mail and export. */
export const CLIENT_STATE_WORDS: Record<ClientState, string> = {
  'not sent': 'Not sent to the client',
  waiting: 'Waiting for client',
  'signed off': 'Client signed off',
  'changes asked': 'Client asked for changes',
};

/** The words for a client state id (the id itself when unknown). */
export const clientStateWord = (state: string) => CLIENT_STATE_WORDS[state as ClientState] ?? state;

/** Where a shot's first frame number falls: the first head-handle frame (common practice, no source) or the cut in. */
export const HANDLE_CONVENTIONS = ['head-handle', 'cut-in'] as const;
export type HandleConvention = (typeof HANDLE_CONVENTIONS)[number];
export const HANDLE_CONVENTION_WORDS: Record<HandleConvention, string> = {
  'head-handle': 'The first frame number is the first head-handle frame',
  'cut-in': 'The first frame number is the cut in',
};

export const BAKE_STATES = ['none', 'queued', 'baking', 'baked', 'failed', 'cancelled'] as const;
export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export const ASSET_KINDS = ['plate', 'thumbnail', 'clip', 'stats', 'export', 'picture'] as const;
