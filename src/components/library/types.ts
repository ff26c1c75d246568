// Shapes of the shot library's API answers as the browser sees them (dates arrive as ISO strings).
import type { ClientState, HandleConvention, ShotStatus } from '~/lib/vocab';

export type RoleName = 'owner' | 'supervisor' | 'artist' | 'client';

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

export interface ShowRow {
  id: number;
  code: string;
  name: string;
  description: string | null;
  frameRate: string;
  archivedAt: string | null;
  createdAt: string;
  updatedAt: string;
  shotCount: number;
}

export interface ShowDetail extends ShowRow {
  statusCounts: Partial<Record<ShotStatus, number>>;
}

export interface ShotRow {
  id: number;
  showId: number;
  showCode: string;
  code: string;
  description: string | null;
  firstFrame: number;
  lastFrame: number;
  /** Frames before the cut in and after the cut out. */
  headHandles: number;
  tailHandles: number;
  frameRate: string;
  /** Source timecode of the cut-in frame; from an edit also record in/out (out exclusive), reel and clip name. */
  sourceTimecodeIn: string | null;
  /** Shot frame number of the plate's first frame (null: the cut in). */
  plateFirstFrame: number | null;
  recordIn: string | null;
  recordOut: string | null;
  reel: string | null;
  clipName: string | null;
  plateWidth: number;
  plateHeight: number;
  pixelAspect: number;
  assigneeId: string | null;
  assigneeName: string | null;
  dueDate: string | null;
  status: ShotStatus;
  plateAssetId: number | null;
  thumbnailAssetId: number | null;
  /** A short-lived URL of the thumbnail (PNG, 320 px wide), or null when the shot has none. */
  thumbnailUrl: string | null;
  metresPerPixel: number | null;
  archivedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface AssetInfo {
  id: number;
  kind: string;
  contentType: string;
  byteSize: number | null;
  width: number | null;
  height: number | null;
  format: string | null;
  createdAt: string;
}

export interface VersionRow {
  id: number;
  number: number;
  authorId: string | null;
  authorName: string | null;
  createdAt: string;
  bakeState: string;
  reviewState: string;
  sharedWithClient: boolean;
  /** The client's sign-off, apart from the review state. */
  clientState: ClientState;
  plateAssetId: number | null;
  clipAssetId: number | null;
}

export interface ShotDetail extends ShotRow {
  plate: AssetInfo | null;
  thumbnail: AssetInfo | null;
  versions: VersionRow[];
}

export interface Person {
  userId: string;
  name: string;
  role: RoleName;
}

export interface ActivityEntry {
  id: number;
  action: string;
  actorName: string | null;
  detail: Record<string, unknown> | null;
  versionId?: number | null;
  versionNumber?: number | null;
  createdAt: string;
}

/** What the screen needs to know about the signed-in member. */
export interface Viewer {
  studioId: number;
  studioSlug: string;
  role: RoleName;
  /** The studio's handle convention: where a new shot's first frame number falls. */
  handleConvention?: HandleConvention;
}

const rank: Record<RoleName, number> = { client: 0, artist: 1, supervisor: 2, owner: 3 };
/** True when the role includes the powers of `needed` (a client satisfies only 'client'). */
export function can(role: RoleName, needed: RoleName): boolean {
  if (needed === 'client') return true;
  if (role === 'client') return false;
  return rank[role] >= rank[needed];
}

export const keys = {
  shows: (studioId: number, params: Record<string, unknown>) => ['library', studioId, 'shows', params] as const,
  show: (studioId: number, showId: number) => ['library', studioId, 'show', showId] as const,
  shots: (studioId: number, params: Record<string, unknown>) => ['library', studioId, 'shots', params] as const,
  allShots: (studioId: number) => ['library', studioId, 'shots'] as const,
  shot: (studioId: number, shotId: number) => ['library', studioId, 'shot', shotId] as const,
  people: (studioId: number) => ['library', studioId, 'people'] as const,
  activity: (studioId: number, shotId: number) => ['library', studioId, 'activity', shotId] as const,
  plate: (studioId: number, assetId: number) => ['library', studioId, 'plate', assetId] as const,
};
