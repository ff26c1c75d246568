// The Tidemark database: studios and their people, the shot library, versions, review, bakes, assets and sharing.
// Every row that belongs to a studio carries studio_id, so one query filter keeps studios apart.
import {
  mysqlTable,
  bigint,
  varchar,
  text,
  int,
  boolean,
  datetime,
  date,
  double,
  json,
  mysqlEnum,
  index,
  uniqueIndex,
} from 'drizzle-orm/mysql-core';
import { sql } from 'drizzle-orm';

/** Where a client's comment came from. */
export const CLIENT_NOTE_SOURCES = ['share link', 'client account'] as const;

/** Auto-increment id (drizzle's serial() emits SQL that MariaDB rejects). */
const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey();
const ref = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const createdAt = () => datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`);
const updatedAt = () =>
  datetime('updated_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
    .$onUpdate(() => new Date());

export { ROLES, SHOT_STATUSES, REVIEW_STATES, CLIENT_STATES, BAKE_STATES, JOB_STATES, ASSET_KINDS, HANDLE_CONVENTIONS, type Role } from '../../vocab';
import { ROLES, SHOT_STATUSES, REVIEW_STATES, CLIENT_STATES, BAKE_STATES, JOB_STATES, ASSET_KINDS, HANDLE_CONVENTIONS } from '../../vocab';

export const studios = mysqlTable('studios', {
  id: id(),
  slug: varchar('slug', { length: 64 }).notNull().unique(),
  name: varchar('name', { length: 120 }).notNull(),
  /** Largest bake cost estimate (see src/lib/scene/cost.ts) a version may have; null = the server default. */
  bakeCostLimit: double('bake_cost_limit'),
  /** Where the first frame number (1001 by default) falls: on the first head-handle frame, or on the cut in. */
  handleConvention: mysqlEnum('handle_convention', HANDLE_CONVENTIONS).notNull().default('head-handle'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

/** Users have string ids because the session library keys sessions by string. */
export const users = mysqlTable('users', {
  id: varchar('id', { length: 40 }).primaryKey(),
  email: varchar('email', { length: 254 }).notNull().unique(),
  name: varchar('name', { length: 120 }).notNull(),
  passwordHash: varchar('password_hash', { length: 255 }).notNull(),
  dailyDigest: boolean('daily_digest').notNull().default(false),
  lastActiveAt: datetime('last_active_at', { mode: 'date' }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const sessions = mysqlTable(
  'sessions',
  {
    id: varchar('id', { length: 255 }).primaryKey(),
    userId: varchar('user_id', { length: 40 })
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
    /** When the session began: a session ends after the absolute lifetime however often it slides. */
    createdAt: datetime('created_at', { mode: 'date' }).notNull().default(sql`CURRENT_TIMESTAMP`),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

export const memberships = mysqlTable(
  'memberships',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    userId: varchar('user_id', { length: 40 })
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: mysqlEnum('role', ROLES).notNull(),
    /** When the member last opened their inbox in this studio: inbox items after it count as unread. */
    inboxSeenAt: datetime('inbox_seen_at', { mode: 'date', fsp: 3 }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('memberships_studio_user_uq').on(t.studioId, t.userId), index('memberships_user_idx').on(t.userId)],
);

/** Single-use invitation: only the SHA-256 of the token is stored. */
export const invitations = mysqlTable(
  'invitations',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    email: varchar('email', { length: 254 }).notNull(),
    role: mysqlEnum('role', ROLES).notNull(),
    /** For a client invitation: the ids of the shows the client will see. */
    showIds: json('show_ids').$type<number[]>(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
    invitedBy: varchar('invited_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
    acceptedAt: datetime('accepted_at', { mode: 'date' }),
    revokedAt: datetime('revoked_at', { mode: 'date' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('invitations_studio_idx').on(t.studioId, t.createdAt)],
);

export const passwordResets = mysqlTable('password_resets', {
  id: id(),
  userId: varchar('user_id', { length: 40 })
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
  usedAt: datetime('used_at', { mode: 'date' }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

/** Sign-in attempts, kept to throttle guessing across every app server sharing this database. */
export const signInAttempts = mysqlTable(
  'sign_in_attempts',
  {
    id: id(),
    email: varchar('email', { length: 254 }).notNull(),
    ip: varchar('ip', { length: 64 }).notNull(),
    succeeded: boolean('succeeded').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('sign_in_attempts_email_idx').on(t.email, t.createdAt), index('sign_in_attempts_ip_idx').on(t.ip, t.createdAt)],
);

/**
 * Throttle hits: one row per attempt (recorded before the attempt is judged), counted per bucket and key in the same
 * transaction. Buckets: sign-in per account and per address, share-link password per link and per address, password
 * reset per address and per e-mail. `key` is the SHA-256 of the value, so any length fits.
 */
export const throttleHits = mysqlTable(
  'throttle_hits',
  {
    id: id(),
    bucket: varchar('bucket', { length: 32 }).notNull(),
    keyHash: varchar('key_hash', { length: 64 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('throttle_hits_key_idx').on(t.bucket, t.keyHash, t.createdAt), index('throttle_hits_created_idx').on(t.createdAt)],
);

export const shows = mysqlTable(
  'shows',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    code: varchar('code', { length: 32 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    description: text('description'),
    frameRate: varchar('frame_rate', { length: 12 }).notNull().default('24'),
    archivedAt: datetime('archived_at', { mode: 'date' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('shows_studio_code_uq').on(t.studioId, t.code), index('shows_studio_updated_idx').on(t.studioId, t.updatedAt)],
);

/**
 * The shows a client membership may see (src/lib/server/access.ts reads it). Migration 0003 backfilled every existing
 * client with all its studio's shows; new clients get the shows their invitation names, owners edit them after.
 */
export const clientShows = mysqlTable(
  'client_shows',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    userId: varchar('user_id', { length: 40 })
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    showId: ref('show_id')
      .notNull()
      .references(() => shows.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('client_shows_user_show_uq').on(t.userId, t.showId), index('client_shows_studio_idx').on(t.studioId, t.userId)],
);

export const assets = mysqlTable(
  'assets',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    kind: mysqlEnum('kind', ASSET_KINDS).notNull(),
    storageKey: varchar('storage_key', { length: 400 }).notNull(),
    contentType: varchar('content_type', { length: 100 }).notNull(),
    byteSize: bigint('byte_size', { mode: 'number', unsigned: true }).notNull().default(0),
    width: int('width'),
    height: int('height'),
    versionId: ref('version_id'),
    shotId: ref('shot_id'),
    format: varchar('format', { length: 16 }),
    /** SHA-256 (hex) of the stored object, recorded by whoever wrote it when known. */
    sha256: varchar('sha256', { length: 64 }),
    meta: json('meta'),
    createdBy: varchar('created_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('assets_studio_kind_idx').on(t.studioId, t.kind),
    index('assets_version_idx').on(t.versionId),
    index('assets_shot_idx').on(t.shotId),
  ],
);

export const shots = mysqlTable(
  'shots',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    showId: ref('show_id')
      .notNull()
      .references(() => shows.id, { onDelete: 'cascade' }),
    code: varchar('code', { length: 64 }).notNull(),
    description: text('description'),
    firstFrame: int('first_frame').notNull().default(1001),
    lastFrame: int('last_frame').notNull(),
    /** Head handles in frames, before the cut in (the column keeps its first name, from when one count served both ends). */
    headHandles: int('handles').notNull().default(8),
    /** Tail handles in frames, after the cut out; null (shots made before the two were stored apart) = as many as the head. */
    tailHandles: int('tail_handles'),
    frameRate: varchar('frame_rate', { length: 12 }).notNull().default('24'),
    plateWidth: int('plate_width').notNull().default(1920),
    plateHeight: int('plate_height').notNull().default(1080),
    pixelAspect: double('pixel_aspect').notNull().default(1),
    assigneeId: varchar('assignee_id', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    dueDate: date('due_date', { mode: 'string' }),
    status: mysqlEnum('status', SHOT_STATUSES).notNull().default('blocking'),
    plateAssetId: ref('plate_asset_id').references(() => assets.id, { onDelete: 'set null' }),
    thumbnailAssetId: ref('thumbnail_asset_id').references(() => assets.id, { onDelete: 'set null' }),
    metresPerPixel: double('metres_per_pixel'),
    /** Shot frame number of the plate's first frame (a plate delivered with handles starts before the cut in); null = the cut in. */
    plateFirstFrame: int('plate_first_frame'),
    /** Source (plate) timecode of the cut-in frame; null reads as 00:00:00:00. */
    sourceTimecodeIn: varchar('source_timecode_in', { length: 11 }),
    /** Where the shot sits in the cut, when it came from an edit: record in/out (out exclusive), reel, clip name. */
    recordIn: varchar('record_in', { length: 11 }),
    recordOut: varchar('record_out', { length: 11 }),
    reel: varchar('reel', { length: 64 }),
    clipName: varchar('clip_name', { length: 255 }),
    archivedAt: datetime('archived_at', { mode: 'date' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('shots_show_code_uq').on(t.showId, t.code),
    index('shots_studio_status_idx').on(t.studioId, t.status),
    index('shots_assignee_idx').on(t.assigneeId),
  ],
);

export const versions = mysqlTable(
  'versions',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    shotId: ref('shot_id')
      .notNull()
      .references(() => shots.id, { onDelete: 'cascade' }),
    number: int('number').notNull(),
    authorId: varchar('author_id', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    comment: text('comment'),
    scene: json('scene').notNull(),
    sceneHash: varchar('scene_hash', { length: 64 }).notNull(),
    plateAssetId: ref('plate_asset_id').references(() => assets.id, { onDelete: 'set null' }),
    reviewState: mysqlEnum('review_state', REVIEW_STATES).notNull().default('draft'),
    bakeState: mysqlEnum('bake_state', BAKE_STATES).notNull().default('none'),
    clipAssetId: ref('clip_asset_id').references(() => assets.id, { onDelete: 'set null' }),
    sharedWithClient: boolean('shared_with_client').notNull().default(false),
    /**
     * The client's sign-off, apart from the studio's review state: 'not sent' until a supervisor asks for it (only once
     * approved by us), then 'waiting', then the client's decision. Who decided: a client account (client_decided_by) or
     * a guest with the share link (only the name they gave); the comment says what to change.
     */
    clientState: mysqlEnum('client_state', CLIENT_STATES).notNull().default('not sent'),
    clientSentAt: datetime('client_sent_at', { mode: 'date' }),
    clientDecidedAt: datetime('client_decided_at', { mode: 'date' }),
    clientDecidedBy: varchar('client_decided_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    clientDeciderName: varchar('client_decider_name', { length: 120 }),
    clientComment: text('client_comment'),
    /** When the studio was last e-mailed the client comments on this version (one mail per version per window). */
    clientNotesMailedAt: datetime('client_notes_mailed_at', { mode: 'date', fsp: 3 }),
    frozenAt: datetime('frozen_at', { mode: 'date' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('versions_shot_number_uq').on(t.shotId, t.number),
    index('versions_studio_review_idx').on(t.studioId, t.reviewState),
    index('versions_studio_client_idx').on(t.studioId, t.clientState),
    index('versions_scene_hash_idx').on(t.sceneHash),
  ],
);

export const reviewEvents = mysqlTable(
  'review_events',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    versionId: ref('version_id')
      .notNull()
      .references(() => versions.id, { onDelete: 'cascade' }),
    actorId: varchar('actor_id', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    fromState: mysqlEnum('from_state', REVIEW_STATES).notNull(),
    toState: mysqlEnum('to_state', REVIEW_STATES).notNull(),
    comment: text('comment'),
    createdAt: createdAt(),
  },
  (t) => [index('review_events_version_idx').on(t.versionId, t.createdAt)],
);

export const notes = mysqlTable(
  'notes',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    versionId: ref('version_id')
      .notNull()
      .references(() => versions.id, { onDelete: 'cascade' }),
    parentId: ref('parent_id'),
    authorId: varchar('author_id', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    guestName: varchar('guest_name', { length: 120 }),
    frame: int('frame').notNull(),
    pointX: double('point_x'),
    pointY: double('point_y'),
    stroke: json('stroke'),
    body: text('body').notNull(),
    internal: boolean('internal').notNull().default(true),
    resolvedAt: datetime('resolved_at', { mode: 'date' }),
    resolvedBy: varchar('resolved_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    /**
     * A client's comment: left through a share link or from a client account (null for the studio's own notes). Such a
     * note waits in the outbox (mailed_at null) until the studio is e-mailed about it, batched per version.
     */
    clientSource: mysqlEnum('client_source', CLIENT_NOTE_SOURCES),
    mailedAt: datetime('mailed_at', { mode: 'date', fsp: 3 }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('notes_version_frame_idx').on(t.versionId, t.frame), index('notes_client_outbox_idx').on(t.clientSource, t.mailedAt)],
);

/** When a person last read a version's notes: notes by others after `seen_at` are "new" in their review inbox. */
export const noteReads = mysqlTable(
  'note_reads',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    userId: varchar('user_id', { length: 40 })
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    versionId: ref('version_id')
      .notNull()
      .references(() => versions.id, { onDelete: 'cascade' }),
    seenAt: datetime('seen_at', { mode: 'date', fsp: 3 }).notNull(),
  },
  (t) => [uniqueIndex('note_reads_user_version_uq').on(t.userId, t.versionId)],
);

/**
 * A member's marks on single inbox items: a shot assigned to them, a version (in any section), or one note read
 * (read_at), and a returned version they took off their inbox (dismissed_at). An item counts as unread while what
 * it asks happened after its read mark, the member's "mark all read" (memberships.inbox_seen_at) and, for a
 * version, their last read of its notes (note_reads).
 */
export const inboxMarks = mysqlTable(
  'inbox_marks',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    userId: varchar('user_id', { length: 40 })
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    itemType: mysqlEnum('item_type', ['shot', 'version', 'note']).notNull(),
    itemId: bigint('item_id', { mode: 'number', unsigned: true }).notNull(),
    readAt: datetime('read_at', { mode: 'date', fsp: 3 }),
    dismissedAt: datetime('dismissed_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [uniqueIndex('inbox_marks_user_item_uq').on(t.userId, t.itemType, t.itemId), index('inbox_marks_studio_idx').on(t.studioId)],
);

export const bakeJobs = mysqlTable(
  'bake_jobs',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    versionId: ref('version_id')
      .notNull()
      .references(() => versions.id, { onDelete: 'cascade' }),
    sceneHash: varchar('scene_hash', { length: 64 }).notNull(),
    state: mysqlEnum('state', JOB_STATES).notNull().default('queued'),
    attempts: int('attempts').notNull().default(0),
    maxAttempts: int('max_attempts').notNull().default(3),
    leaseOwner: varchar('lease_owner', { length: 100 }),
    leaseExpiresAt: datetime('lease_expires_at', { mode: 'date', fsp: 3 }),
    cancelRequested: boolean('cancel_requested').notNull().default(false),
    framesDone: int('frames_done').notNull().default(0),
    framesTotal: int('frames_total').notNull().default(0),
    error: text('error'),
    requestedBy: varchar('requested_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    startedAt: datetime('started_at', { mode: 'date', fsp: 3 }),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('bake_jobs_state_idx').on(t.state, t.leaseExpiresAt), index('bake_jobs_version_idx').on(t.versionId)],
);

/** How one claim of a bake job ended: still running, done, or not (its objects are then deleted). */
export const BAKE_ATTEMPT_STATES = ['running', 'done', 'lost', 'released', 'failed', 'cancelled'] as const;

/**
 * One claim of a bake job by a worker, with the object keys that attempt writes (unique per attempt, so a late
 * upload of a lost attempt never overwrites the winner's clip). Objects of attempts that did not finish are
 * deleted by whoever learns of them (the attempt itself, the next claimer, the completer); objectsCleared records it.
 */
export const bakeAttempts = mysqlTable(
  'bake_attempts',
  {
    id: id(),
    jobId: ref('job_id')
      .notNull()
      .references(() => bakeJobs.id, { onDelete: 'cascade' }),
    /** The job's attempt count at this claim (a handed-back attempt does not count, so a number can repeat). */
    attempt: int('attempt').notNull(),
    workerId: varchar('worker_id', { length: 100 }).notNull(),
    state: mysqlEnum('state', BAKE_ATTEMPT_STATES).notNull().default('running'),
    clipKey: varchar('clip_key', { length: 400 }).notNull(),
    statsKey: varchar('stats_key', { length: 400 }).notNull(),
    objectsCleared: boolean('objects_cleared').notNull().default(false),
    claimedAt: datetime('claimed_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
    endedAt: datetime('ended_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('bake_attempts_job_idx').on(t.jobId, t.state)],
);

export const shareLinks = mysqlTable(
  'share_links',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    versionId: ref('version_id')
      .notNull()
      .references(() => versions.id, { onDelete: 'cascade' }),
    exportAssetId: ref('export_asset_id').references(() => assets.id, { onDelete: 'set null' }),
    tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
    passwordHash: varchar('password_hash', { length: 255 }),
    expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
    revokedAt: datetime('revoked_at', { mode: 'date' }),
    openCount: int('open_count').notNull().default(0),
    createdBy: varchar('created_by', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('share_links_version_idx').on(t.versionId)],
);

/**
 * The addresses a share link was e-mailed to. A client account with that address (now or made later) finds the
 * link's version in its own home, as long as the link is active (access.ts).
 */
export const shareLinkRecipients = mysqlTable(
  'share_link_recipients',
  {
    id: id(),
    studioId: ref('studio_id')
      .notNull()
      .references(() => studios.id, { onDelete: 'cascade' }),
    shareLinkId: ref('share_link_id')
      .notNull()
      .references(() => shareLinks.id, { onDelete: 'cascade' }),
    email: varchar('email', { length: 254 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('share_link_recipients_link_email_uq').on(t.shareLinkId, t.email), index('share_link_recipients_email_idx').on(t.studioId, t.email)],
);

export const auditLog = mysqlTable(
  'audit_log',
  {
    id: id(),
    studioId: ref('studio_id').references(() => studios.id, { onDelete: 'cascade' }),
    actorId: varchar('actor_id', { length: 40 }).references(() => users.id, { onDelete: 'set null' }),
    action: varchar('action', { length: 64 }).notNull(),
    targetType: varchar('target_type', { length: 32 }),
    targetId: varchar('target_id', { length: 64 }),
    detail: json('detail'),
    createdAt: createdAt(),
  },
  (t) => [index('audit_log_studio_idx').on(t.studioId, t.createdAt)],
);
