// The Tidemark clip: baked particle frames in one binary object, readable a chunk at a time over HTTP Range requests.
//
// Layout (all integers little-endian):
//   bytes 0..7     magic "TDMKCLIP"
//   bytes 8..11    u32 header length H
//   bytes 12..     header: UTF-8 JSON (ClipHeader), H bytes
//   then           index: per chunk 20 bytes — f64 byte offset from file start, u32 byte length,
//                  u32 first frame (shot frame number), u32 frame count
//   then           chunks, each deflate-compressed (fflate) on its own
//
// A chunk, once inflated, is: u32 frame count F, then F × u32 byte offsets (from chunk start), then F frames.
// A frame is: u32 particle count N, f32 max speed (m/s), u32 length of the bin-count plane, then four byte planes:
//   bin counts — for each bin of the tank (row-major from the lower-left), its particle count as LEB128
//   x offsets  — per particle, in bin order: the x offset inside its bin, `offsetBits` bits
//   y offsets  — the same for y
//   speeds     — per particle: round(speed / max speed × 255), stored as the difference from the previous particle's
//
// Version 2 adds, after the speeds plane of every frame:
//   liquids    — only when the header's `look.liquids` has more than one entry: per particle, in bin order, its liquid
//                (index into look.liquids) as one byte, stored as the difference from the previous particle's
//   prop poses — per prop of `look.props`, in that order: i32 x, i32 y (centroid, tank m, in steps of
//                propPositionStep), i32 angle (deg counter-clockwise, in steps of propAngleStep)
// and to the header `look` (what the player needs to draw the frame: liquid colours, walls, props' drawn shapes and
// fill colours, the wall style) plus the two pose steps. A particle keeps its liquid for life (the solver's ids follow
// particles), but a frame stores positions in bin order without ids, so the liquid travels with each position: in
// bin order neighbours share a liquid and the plane deflates to almost nothing (one liquid: no plane at all).
// Foam and spray (optional, version 2): when the header's `diffuse` is true, every frame ends, after the prop poses,
// with its diffuse particles (sim/diffuse.ts): u32 count D, then the x positions as two byte planes (high bytes of all
// D, then low bytes) of u16 steps of `diffuseStep` m, the same for y, then D kind bytes (0 spray, 1 foam, 2 bubble), sorted by the block of their high bytes. Steps
// decode to the step's centre (error ≤ diffuseStep / 2); clips without the flag decode with no diffuse particles.
// Version 1 clips (no liquids, no poses, no look) still decode: every particle is of liquid 0 and there are no props.
//
// Positions are binned on a square grid of side `binSize` (the tank's longer side / binsAcross) and stored as the
// offset inside the bin: the position error is at most binSize / 2^offsetBits / 2. Particles are stored in bin order,
// so a frame carries positions, not identities (the player needs none), and neighbours sit next to each other,
// which is what makes the planes compress.

import type { Shape } from '../scene/shapes';
import type { WallStyle } from '../scene/schema';

export const CLIP_MAGIC = 'TDMKCLIP';
export const CLIP_FORMAT_VERSION = 2;
/** Versions this reader decodes. */
export const CLIP_FORMAT_VERSIONS = [1, 2] as const;
export const INDEX_ENTRY_BYTES = 20;
/** Default prop pose steps of version 2: 10 µm and 0.001°, so a pose comes back within 5 µm and 0.0005°. */
export const PROP_POSITION_STEP = 1e-5;
export const PROP_ANGLE_STEP = 1e-3;


/** What a frame needs to be drawn beside its particles (version 2 header). */
export interface ClipLook {
  /** The scene's liquids in order: a particle's liquid indexes this list. Colours are #RRGGBB. */
  liquids: { id: string; colour: string }[];
  walls: { id: string; shape: Shape }[];
  wallStyle: WallStyle;
  /** Props in the scene's order, each in its drawn pose, with its drawn centroid (m) and fill colour (#RRGGBB). */
  props: { id: string; shape: Shape; centroid: [number, number]; colour: string }[];
}

export interface ClipHeader {
  format: 'tidemark-clip';
  formatVersion: number;
  /** Shot frames, inclusive. */
  startFrame: number;
  endFrame: number;
  fps: number;
  /** Tank size in metres. */
  tankWidth: number;
  tankHeight: number;
  /** Largest particle count the solver could reach. */
  particleCapacity: number;
  /** Which solver build made the frames, and the scene it baked. */
  solverBuild: string;
  sceneHash: string;
  /** Quantization: bins across the tank's longer side, and bits per axis for the offset inside a bin. */
  binsAcross: number;
  offsetBits: number;
  binsX: number;
  binsY: number;
  /** Metres. */
  binSize: number;
  framesPerChunk: number;
  chunkCount: number;
  /** Version 2: drawing facts, and the steps (m, deg) of the stored prop poses. */
  look?: ClipLook;
  propPositionStep?: number;
  propAngleStep?: number;
  /** Version 2, optional: frames carry foam and spray particles, positions in steps of diffuseStep (m). */
  diffuse?: boolean;
  diffuseStep?: number;
}

export interface ClipIndexEntry {
  offset: number;
  length: number;
  firstFrame: number;
  frameCount: number;
}

/** A prop's pose in a frame: where its drawn centroid is (tank m) and its angle (deg, counter-clockwise). */
export interface PropPose {
  x: number;
  y: number;
  angle: number;
}

/** One decoded frame: positions in metres (tank coordinates), speeds in m/s, liquids, and the props' poses. */
export interface ClipFrame {
  frame: number;
  count: number;
  x: Float32Array;
  y: Float32Array;
  speed: Float32Array;
  maxSpeed: number;
  /** Liquid of each particle (index into the header's look.liquids; all 0 in a version 1 clip). */
  liquid: Uint8Array;
  /** One pose per prop of look.props (empty in a version 1 clip). */
  props: PropPose[];
  /** Foam and spray particles (none when the clip has no diffuse section). */
  diffuse: DiffuseFrame;
}

/** A frame's diffuse particles: positions (tank m) and kind (DIFFUSE_SPRAY, DIFFUSE_FOAM or DIFFUSE_BUBBLE). */
export interface DiffuseFrame {
  count: number;
  x: Float32Array;
  y: Float32Array;
  kind: Uint8Array;
}

export const DIFFUSE_SPRAY = 0;
export const DIFFUSE_FOAM = 1;
export const DIFFUSE_BUBBLE = 2;
/** Steps of a u16 diffuse position across the tank's longer side. */
export const DIFFUSE_LEVELS = 65536;

/** Largest diffuse position error of a clip, metres (half a step), or null when it has no diffuse section. */
export function diffuseErrorBound(h: Pick<ClipHeader, 'diffuse' | 'diffuseStep'>): number | null {
  return h.diffuse && h.diffuseStep ? h.diffuseStep / 2 : null;
}

/** Largest position error, in metres, of a clip with this header (half a quantization step). */
export function positionErrorBound(h: Pick<ClipHeader, 'binSize' | 'offsetBits'>): number {
  return h.binSize / (1 << h.offsetBits) / 2;
}

/** Largest prop pose error of a version 2 clip: metres and degrees (half a step), or null for version 1. */
export function propPoseErrorBound(h: Pick<ClipHeader, 'propPositionStep' | 'propAngleStep'>): { position: number; angle: number } | null {
  if (!h.propPositionStep || !h.propAngleStep) return null;
  return { position: h.propPositionStep / 2, angle: h.propAngleStep / 2 };
}
