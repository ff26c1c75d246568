// Shapes the version page hands to its island, and the answers of the bake and clip endpoints.
import type { PropPictureRef } from '~/lib/render/prop-pictures';
import type { FrameStats } from '~/lib/sim';
import type { BakeHealth } from '~/lib/sim/health';
import type { ClientState } from '~/lib/vocab';

export type BakeState = 'none' | 'queued' | 'baking' | 'baked' | 'failed' | 'cancelled';

export interface VersionInfo {
  id: number;
  number: number;
  authorName: string | null;
  comment: string | null;
  reviewState: string;
  /** The client's sign-off, apart from the review state (src/lib/vocab.ts CLIENT_STATES). */
  clientState: ClientState;
  bakeState: BakeState;
  createdAt: string;
  /** The scene's frame range (what a bake produces). */
  startFrame: number;
  endFrame: number;
}

export interface ShotInfo {
  id: number;
  code: string;
  showCode: string;
  description: string | null;
  firstFrame: number;
  lastFrame: number;
  /** Frames before the cut in and after the cut out. */
  headHandles: number;
  tailHandles: number;
  /** Frame rate id, e.g. '25' or '29.97df'. */
  frameRate: string;
  /** Source timecode of the cut-in frame (null reads as 00:00:00:00): every frame is shown with its source timecode. */
  sourceTimecodeIn: string | null;
  /** Shot frame number of the plate's first frame (null: the cut in); a video plate seeks by this offset. */
  plateFirstFrame: number | null;
  metresPerPixel: number | null;
}

export interface PlateInfo {
  assetId: number;
  contentType: string;
  width: number | null;
  height: number | null;
  /** A presigned URL made with the page (short-lived; the island asks for a new one when it expires). */
  url: string | null;
}

export interface ClipInfo {
  clipUrl: string;
  statsUrl: string | null;
  bytes?: number | null;
  /** The bake's health verdict (absent for bakes stored before verdicts existed). */
  health?: BakeHealth | null;
  /** The pictures the version's props are drawn as (absent or empty: every prop in its fill colour). */
  propPictures?: PropPictureRef[];
}

export interface BakeProgress {
  bakeState: BakeState;
  bake: {
    id: number;
    state: 'queued' | 'running' | 'done' | 'failed' | 'cancelled';
    attempts: number;
    maxAttempts: number;
    framesDone: number;
    framesTotal: number;
    percent: number;
    etaSeconds: number | null;
    error: string | null;
    cancelRequested: boolean;
  } | null;
}

/** The stats file stored beside a clip (liquidArea is null before the first step). */
export interface BakeStats {
  solverBuild: string;
  frames: (Omit<FrameStats, 'liquidArea'> & { liquidArea: number | null })[];
}
