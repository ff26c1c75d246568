// Writes a clip (see format.ts): add frames in order, then finish() returns the bytes (or, streaming, onChunk
// receives each chunk as it is made and finishHead() returns what goes before them).
import { deflateSync } from 'fflate';
import {
  CLIP_FORMAT_VERSION, CLIP_MAGIC, DIFFUSE_LEVELS, INDEX_ENTRY_BYTES, PROP_ANGLE_STEP, PROP_POSITION_STEP,
  type ClipHeader, type ClipIndexEntry, type ClipLook, type PropPose,
} from './format';

/** What a frame carries beside positions and velocities (version 2). */
export interface FrameExtras {
  /** Liquid of each particle (index into look.liquids), same order as x/y; omitted: every particle is liquid 0. */
  liquid?: ArrayLike<number>;
  /** One pose per prop of look.props, in that order (centroid m, angle deg). */
  props?: readonly PropPose[];
  /** Foam and spray particles (only when the writer was made with `diffuse: true`): positions (m) and kinds. */
  diffuse?: { count: number; x: ArrayLike<number>; y: ArrayLike<number>; kind: ArrayLike<number> };
}

/** The look of a clip whose writer was given none: one liquid in the default colour, nothing else drawn. */
export const PLAIN_LOOK: ClipLook = { liquids: [{ id: 'water', colour: '#3A8FB7' }], walls: [], wallStyle: 'outline', props: [] };

export interface ClipWriterOptions {
  startFrame: number;
  endFrame: number;
  fps: number;
  tankWidth: number;
  tankHeight: number;
  particleCapacity: number;
  solverBuild: string;
  sceneHash: string;
  /** Bins across the tank's longer side (default 128). */
  binsAcross?: number;
  /** Bits per axis for the offset inside a bin (default 5: error ≤ longer side / 8192). */
  offsetBits?: number;
  framesPerChunk?: number;
  /** Deflate level 1–9 (default 3: on the reference dam break, 1% larger than level 6 and 2.7× faster to encode). */
  level?: 1 | 2 | 3 | 4 | 5 | 6 | 7 | 8 | 9;
  /** Liquids, walls and props to draw (default PLAIN_LOOK). */
  look?: ClipLook;
  /**
   * Receives each compressed chunk, in order, as soon as it is made; the writer then keeps only the index, and
   * finishHead() returns the bytes that go before the chunks (a streaming bake uploads the chunks as they come).
   */
  onChunk?: (chunk: Uint8Array) => void;
  /** Frames carry a foam and spray section (format.ts). Default false. */
  diffuse?: boolean;
}

export class ClipWriter {
  readonly header: ClipHeader;
  private level: NonNullable<ClipWriterOptions['level']>;
  private onChunk?: (chunk: Uint8Array) => void;
  private chunks: Uint8Array[] = [];
  private index: ClipIndexEntry[] = [];
  private pending: Uint8Array[] = [];
  private pendingFirst = 0;
  private framesWritten = 0;
  // Scratch, grown on demand and reused across frames.
  private binOf = new Int32Array(0);
  private order = new Int32Array(0);
  private binStart: Int32Array;
  private diffuseStart: Int32Array | undefined;

  constructor(o: ClipWriterOptions) {
    const binsAcross = o.binsAcross ?? 128;
    const offsetBits = o.offsetBits ?? 5;
    if (offsetBits < 1 || offsetBits > 8) throw new Error('offsetBits must be 1..8');
    const binSize = Math.max(o.tankWidth, o.tankHeight) / binsAcross;
    const binsX = Math.max(1, Math.ceil(o.tankWidth / binSize - 1e-9));
    const binsY = Math.max(1, Math.ceil(o.tankHeight / binSize - 1e-9));
    const framesPerChunk = o.framesPerChunk ?? 8;
    this.level = o.level ?? 3;
    this.onChunk = o.onChunk;
    this.header = {
      format: 'tidemark-clip',
      formatVersion: CLIP_FORMAT_VERSION,
      startFrame: o.startFrame,
      endFrame: o.endFrame,
      fps: o.fps,
      tankWidth: o.tankWidth,
      tankHeight: o.tankHeight,
      particleCapacity: o.particleCapacity,
      solverBuild: o.solverBuild,
      sceneHash: o.sceneHash,
      binsAcross,
      offsetBits,
      binsX,
      binsY,
      binSize,
      framesPerChunk,
      chunkCount: Math.ceil((o.endFrame - o.startFrame + 1) / framesPerChunk),
      look: o.look ?? PLAIN_LOOK,
      propPositionStep: PROP_POSITION_STEP,
      propAngleStep: PROP_ANGLE_STEP,
      ...(o.diffuse ? { diffuse: true, diffuseStep: Math.max(o.tankWidth, o.tankHeight) / DIFFUSE_LEVELS } : {}),
    };
    if (this.header.look!.liquids.length > 256) throw new Error('a clip holds at most 256 liquids');
    this.binStart = new Int32Array(binsX * binsY + 1);
  }

  /** Frames added so far. */
  get frameCount() {
    return this.framesWritten;
  }

  /**
   * Adds the next frame: particle positions (m) and velocities (m/s), and their liquids and the props' poses;
   * only the first `count` entries are read.
   */
  addFrame(count: number, x: ArrayLike<number>, y: ArrayLike<number>, u: ArrayLike<number>, v: ArrayLike<number>, extras: FrameExtras = {}): void {
    const props = this.header.look!.props.length;
    if ((extras.props?.length ?? 0) !== props) throw new Error(`frame has ${extras.props?.length ?? 0} prop poses, the clip has ${props} props`);
    const h = this.header;
    const total = h.endFrame - h.startFrame + 1;
    if (this.framesWritten >= total) throw new Error(`clip already has its ${total} frames`);
    if (this.pending.length === 0) this.pendingFirst = h.startFrame + this.framesWritten;
    const frame = this.encodeFrame(count, x, y, u, v, extras);
    this.pending.push(h.diffuse ? concat(frame, this.encodeDiffuse(extras.diffuse)) : frame);
    this.framesWritten++;
    if (this.pending.length === h.framesPerChunk || this.framesWritten === total) this.flushChunk();
  }

  private encodeFrame(n: number, x: ArrayLike<number>, y: ArrayLike<number>, u: ArrayLike<number>, v: ArrayLike<number>, extras: FrameExtras): Uint8Array {
    const { binsX, binsY, binSize, offsetBits } = this.header;
    const look = this.header.look!;
    const liquidPlane = look.liquids.length > 1 ? n : 0;
    const poses = extras.props ?? [];
    const bins = binsX * binsY;
    if (this.binOf.length < n) {
      this.binOf = new Int32Array(n * 2);
      this.order = new Int32Array(n * 2);
    }
    const binOf = this.binOf;
    const order = this.order;
    const start = this.binStart;
    start.fill(0);
    const inv = 1 / binSize;
    let maxSpeed = 0;
    // Counting sort of particles by bin (row-major from the lower-left).
    for (let i = 0; i < n; i++) {
      let bx = Math.floor(x[i] * inv);
      let by = Math.floor(y[i] * inv);
      bx = bx < 0 ? 0 : bx >= binsX ? binsX - 1 : bx;
      by = by < 0 ? 0 : by >= binsY ? binsY - 1 : by;
      const b = by * binsX + bx;
      binOf[i] = b;
      start[b + 1]++;
      const s = u[i] * u[i] + v[i] * v[i];
      if (s > maxSpeed) maxSpeed = s;
    }
    maxSpeed = Math.sqrt(maxSpeed);
    // Bin counts as LEB128, measured before the prefix sum overwrites them.
    let countBytes = 0;
    for (let b = 1; b <= bins; b++) {
      let c = start[b];
      do {
        countBytes++;
        c >>>= 7;
      } while (c > 0);
    }
    const body = new Uint8Array(12 + countBytes + 3 * n + liquidPlane + 12 * poses.length);
    const dv = new DataView(body.buffer);
    dv.setUint32(0, n, true);
    dv.setFloat32(4, maxSpeed, true);
    dv.setUint32(8, countBytes, true);
    let p = 12;
    for (let b = 1; b <= bins; b++) {
      let c = start[b];
      while (c >= 0x80) {
        body[p++] = (c & 0x7f) | 0x80;
        c >>>= 7;
      }
      body[p++] = c;
    }
    for (let b = 0; b < bins; b++) start[b + 1] += start[b];
    const fill = start.slice(0, bins);
    for (let i = 0; i < n; i++) order[fill[binOf[i]]++] = i;

    const levels = 1 << offsetBits;
    const maxLevel = levels - 1;
    const xPlane = p;
    const yPlane = p + n;
    const sPlane = p + 2 * n;
    const lPlane = p + 3 * n;
    const liquid = extras.liquid;
    const liquids = look.liquids.length;
    let prevLiquid = 0;
    const speedScale = maxSpeed > 0 ? 255 / maxSpeed : 0;
    let prevSpeed = 0;
    for (let k = 0; k < n; k++) {
      const i = order[k];
      const b = binOf[i];
      const by = (b / binsX) | 0;
      const bx = b - by * binsX;
      // Offset inside the bin, quantized to the nearest of 2^bits cell centres: x' = (bx + (q + ½)/2^bits)·binSize.
      let qx = Math.floor((x[i] * inv - bx) * levels);
      let qy = Math.floor((y[i] * inv - by) * levels);
      qx = qx < 0 ? 0 : qx > maxLevel ? maxLevel : qx;
      qy = qy < 0 ? 0 : qy > maxLevel ? maxLevel : qy;
      body[xPlane + k] = qx;
      body[yPlane + k] = qy;
      const s = Math.round(Math.sqrt(u[i] * u[i] + v[i] * v[i]) * speedScale);
      body[sPlane + k] = (s - prevSpeed) & 0xff;
      prevSpeed = s;
      if (liquidPlane) {
        const l = liquid ? liquid[i] : 0;
        if (!(l >= 0 && l < liquids)) throw new Error(`particle ${i} has liquid ${l}; the clip has ${liquids} liquids`);
        body[lPlane + k] = (l - prevLiquid) & 0xff;
        prevLiquid = l;
      }
    }
    // Prop poses, rounded to the header's steps: the error is at most half a step.
    const { propPositionStep, propAngleStep } = this.header;
    let q = lPlane + liquidPlane;
    for (const pose of poses) {
      dv.setInt32(q, toStep(pose.x, propPositionStep!), true);
      dv.setInt32(q + 4, toStep(pose.y, propPositionStep!), true);
      dv.setInt32(q + 8, toStep(pose.angle, propAngleStep!), true);
      q += 12;
    }
    return body;
  }

  /**
   * The diffuse section of a frame (format.ts): count, x and y as high/low byte planes of u16 steps, kinds. The
   * particles are stored sorted by the 256 × 256 block their high bytes name (their order carries nothing), so the
   * high-byte planes come in runs and deflate to little.
   */
  private encodeDiffuse(d: FrameExtras['diffuse']): Uint8Array {
    const n = d?.count ?? 0;
    const out = new Uint8Array(4 + 5 * n);
    new DataView(out.buffer).setUint32(0, n, true);
    if (!d || n === 0) return out;
    const inv = 1 / this.header.diffuseStep!;
    const qx = new Uint16Array(n), qy = new Uint16Array(n);
    const quantize = (v: number) => { const q = Math.floor(v * inv); return q < 0 ? 0 : q > DIFFUSE_LEVELS - 1 ? DIFFUSE_LEVELS - 1 : q; };
    const start = (this.diffuseStart ??= new Int32Array(65537));
    start.fill(0);
    for (let i = 0; i < n; i++) {
      qx[i] = quantize(d.x[i]); qy[i] = quantize(d.y[i]);
      start[((qy[i] >>> 8) << 8) + (qx[i] >>> 8) + 1]++;
    }
    for (let b = 0; b < 65536; b++) start[b + 1] += start[b];
    const xs = 4, ys = 4 + 2 * n, ks = 4 + 4 * n;
    for (let i = 0; i < n; i++) {
      const k = start[((qy[i] >>> 8) << 8) + (qx[i] >>> 8)]++;
      out[xs + k] = qx[i] >>> 8; out[xs + n + k] = qx[i] & 0xff;
      out[ys + k] = qy[i] >>> 8; out[ys + n + k] = qy[i] & 0xff;
      out[ks + k] = d.kind[i];
    }
    return out;
  }

  private flushChunk(): void {
    const frames = this.pending;
    const tableBytes = 4 + 4 * frames.length;
    let size = tableBytes;
    for (const f of frames) size += f.length;
    const raw = new Uint8Array(size);
    const dv = new DataView(raw.buffer);
    dv.setUint32(0, frames.length, true);
    let p = tableBytes;
    frames.forEach((f, k) => {
      dv.setUint32(4 + 4 * k, p, true);
      raw.set(f, p);
      p += f.length;
    });
    const packed = deflateSync(raw, { level: this.level });
    this.index.push({ offset: 0, length: packed.length, firstFrame: this.pendingFirst, frameCount: frames.length });
    if (this.onChunk) this.onChunk(packed);
    else this.chunks.push(packed);
    this.pending = [];
  }

  /** Returns the whole clip. All frames of the range must have been added (and no onChunk given). */
  finish(): Uint8Array {
    if (this.onChunk) throw new Error('the chunks went to onChunk: use finishHead()');
    const head = this.finishHead();
    const out = new Uint8Array(head.length + this.chunks.reduce((a, c) => a + c.length, 0));
    out.set(head, 0);
    this.chunks.forEach((c, k) => out.set(c, this.index[k].offset));
    return out;
  }

  /** Returns the bytes before the first chunk (magic, header, index); the chunks follow them in order. */
  finishHead(): Uint8Array {
    const h = this.header;
    const total = h.endFrame - h.startFrame + 1;
    if (this.framesWritten !== total) throw new Error(`clip has ${this.framesWritten} of ${total} frames`);
    const headerJson = new TextEncoder().encode(JSON.stringify(h));
    const indexStart = 12 + headerJson.length;
    let offset = indexStart + this.index.length * INDEX_ENTRY_BYTES;
    for (const e of this.index) {
      e.offset = offset;
      offset += e.length;
    }
    const out = new Uint8Array(indexStart + this.index.length * INDEX_ENTRY_BYTES);
    const dv = new DataView(out.buffer);
    for (let i = 0; i < 8; i++) out[i] = CLIP_MAGIC.charCodeAt(i);
    dv.setUint32(8, headerJson.length, true);
    out.set(headerJson, 12);
    this.index.forEach((e, k) => {
      const at = indexStart + k * INDEX_ENTRY_BYTES;
      dv.setFloat64(at, e.offset, true);
      dv.setUint32(at + 8, e.length, true);
      dv.setUint32(at + 12, e.firstFrame, true);
      dv.setUint32(at + 16, e.frameCount, true);
    });
    return out;
  }
}

/** A value in whole steps, as an i32 (clamped: 2³¹ steps of 10 µm is 21 km, of 0.001° about 6000 turns). */
function toStep(value: number, step: number): number {
  const k = Math.round(value / step);
  if (!Number.isFinite(k)) throw new Error('a prop pose is not a finite number');
  return Math.max(-0x80000000, Math.min(0x7fffffff, k));
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}
