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
// Positions are binned on a square grid of side `binSize` (the tank's longer side / binsAcross) and stored as the
// offset inside the bin: the position error is at most binSize / 2^offsetBits / 2. Particles are stored in bin order,
// so a frame carries positions, not identities (the player needs none), and neighbours sit next to each other,
// which is what makes the planes compress.

export const CLIP_MAGIC = 'TDMKCLIP';
export const CLIP_FORMAT_VERSION = 1;
export const INDEX_ENTRY_BYTES = 20;

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
}

export interface ClipIndexEntry {
  offset: number;
  length: number;
  firstFrame: number;
  frameCount: number;
}

/** One decoded frame: positions in metres (tank coordinates), speeds in m/s. */
export interface ClipFrame {
  frame: number;
  count: number;
  x: Float32Array;
  y: Float32Array;
  speed: Float32Array;
  maxSpeed: number;
}

/** Largest position error, in metres, of a clip with this header (half a quantization step). */
export function positionErrorBound(h: Pick<ClipHeader, 'binSize' | 'offsetBits'>): number {
  return h.binSize / (1 << h.offsetBits) / 2;
}
