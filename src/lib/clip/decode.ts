// Reads a clip a chunk at a time: open() fetches the header and index, frameAt() fetches and inflates one chunk.
import { inflateSync } from 'fflate';
import { CLIP_FORMAT_VERSIONS, CLIP_MAGIC, INDEX_ENTRY_BYTES, type ClipFrame, type ClipHeader, type ClipIndexEntry, type DiffuseFrame, type PropPose } from './format';

/** Fetches bytes [start, endInclusive] of the clip (an HTTP Range request in the browser, a slice in tests). */
export type RangeFetcher = (start: number, endInclusive: number) => Promise<Uint8Array>;

const HEAD_GUESS = 64 * 1024;

/** Parses the header and index from the first bytes of a clip; returns how many bytes it needs if given too few. */
export function parseHead(bytes: Uint8Array): { header: ClipHeader; index: ClipIndexEntry[] } | { needBytes: number } {
  if (bytes.length < 12) return { needBytes: 12 };
  for (let i = 0; i < 8; i++) if (bytes[i] !== CLIP_MAGIC.charCodeAt(i)) throw new Error('not a Tidemark clip');
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const headerLength = dv.getUint32(8, true);
  if (bytes.length < 12 + headerLength) return { needBytes: 12 + headerLength };
  const header = JSON.parse(new TextDecoder().decode(bytes.subarray(12, 12 + headerLength))) as ClipHeader;
  if (header.format !== 'tidemark-clip' || !(CLIP_FORMAT_VERSIONS as readonly number[]).includes(header.formatVersion)) throw new Error(`unsupported clip format ${header.formatVersion}`);
  const indexStart = 12 + headerLength;
  const indexEnd = indexStart + header.chunkCount * INDEX_ENTRY_BYTES;
  if (bytes.length < indexEnd) return { needBytes: indexEnd };
  const index: ClipIndexEntry[] = [];
  for (let k = 0; k < header.chunkCount; k++) {
    const at = indexStart + k * INDEX_ENTRY_BYTES;
    index.push({
      offset: dv.getFloat64(at, true),
      length: dv.getUint32(at + 8, true),
      firstFrame: dv.getUint32(at + 12, true),
      frameCount: dv.getUint32(at + 16, true),
    });
  }
  return { header, index };
}

/** Decodes frame k (0-based within the chunk) of an inflated chunk. */
export function decodeFrame(header: ClipHeader, chunk: Uint8Array, k: number, frame: number): ClipFrame {
  const dv = new DataView(chunk.buffer, chunk.byteOffset, chunk.byteLength);
  const frames = dv.getUint32(0, true);
  if (k < 0 || k >= frames) throw new Error(`frame ${frame} is not in this chunk`);
  let p = dv.getUint32(4 + 4 * k, true);
  const n = dv.getUint32(p, true);
  const maxSpeed = dv.getFloat32(p + 4, true);
  const countBytes = dv.getUint32(p + 8, true);
  p += 12;
  const { binsX, binsY, binSize, offsetBits } = header;
  const x = new Float32Array(n);
  const y = new Float32Array(n);
  const speed = new Float32Array(n);
  const step = 1 / (1 << offsetBits);
  const xPlane = p + countBytes;
  const yPlane = xPlane + n;
  const sPlane = yPlane + n;
  const lPlane = sPlane + n;
  const hasLiquids = header.formatVersion >= 2 && (header.look?.liquids.length ?? 1) > 1;
  const liquid = new Uint8Array(n);
  const speedScale = maxSpeed / 255;
  let i = 0;
  let s = 0;
  const bins = binsX * binsY;
  for (let b = 0; b < bins; b++) {
    let c = 0;
    let shift = 0;
    let byte: number;
    do {
      byte = chunk[p++];
      c |= (byte & 0x7f) << shift;
      shift += 7;
    } while (byte & 0x80);
    if (c === 0) continue;
    const by = (b / binsX) | 0;
    const bx = b - by * binsX;
    for (const end = i + c; i < end; i++) {
      x[i] = (bx + (chunk[xPlane + i] + 0.5) * step) * binSize;
      y[i] = (by + (chunk[yPlane + i] + 0.5) * step) * binSize;
      s = (s + chunk[sPlane + i]) & 0xff;
      speed[i] = s * speedScale;
    }
  }
  if (i !== n) throw new Error(`clip frame ${frame} is damaged (${i} of ${n} particles)`);
  const props: PropPose[] = [];
  let diffuse: DiffuseFrame = NO_DIFFUSE;
  if (header.formatVersion >= 2) {
    if (hasLiquids) {
      let l = 0;
      for (let k = 0; k < n; k++) liquid[k] = l = (l + chunk[lPlane + k]) & 0xff;
    }
    const posStep = header.propPositionStep!;
    const angleStep = header.propAngleStep!;
    let q = lPlane + (hasLiquids ? n : 0);
    for (let k = 0; k < (header.look?.props.length ?? 0); k++, q += 12) {
      props.push({ x: dv.getInt32(q, true) * posStep, y: dv.getInt32(q + 4, true) * posStep, angle: dv.getInt32(q + 8, true) * angleStep });
    }
    if (header.diffuse) diffuse = decodeDiffuse(chunk, q, header.diffuseStep!);
  }
  return { frame, count: n, x, y, speed, maxSpeed, liquid, props, diffuse };
}

const NO_DIFFUSE: DiffuseFrame = { count: 0, x: new Float32Array(0), y: new Float32Array(0), kind: new Uint8Array(0) };

/** The foam and spray section at byte p of an inflated chunk (format.ts). */
function decodeDiffuse(chunk: Uint8Array, p: number, step: number): DiffuseFrame {
  const n = new DataView(chunk.buffer, chunk.byteOffset, chunk.byteLength).getUint32(p, true);
  const x = new Float32Array(n), y = new Float32Array(n);
  const xs = p + 4, ys = xs + 2 * n, ks = ys + 2 * n;
  for (let i = 0; i < n; i++) {
    x[i] = ((chunk[xs + i] << 8) + chunk[xs + n + i] + 0.5) * step;
    y[i] = ((chunk[ys + i] << 8) + chunk[ys + n + i] + 0.5) * step;
  }
  return { count: n, x, y, kind: chunk.slice(ks, ks + n) };
}

/** Random access to a clip's frames; keeps the last few inflated chunks. */
export class ClipReader {
  private cache = new Map<number, Promise<Uint8Array>>();
  bytesFetched = 0;

  private constructor(
    readonly header: ClipHeader,
    readonly index: ClipIndexEntry[],
    private fetchRange: RangeFetcher,
    private cacheChunks: number,
  ) {}

  static async open(fetchRange: RangeFetcher, cacheChunks = 8): Promise<ClipReader> {
    let bytes = await fetchRange(0, HEAD_GUESS - 1);
    let fetched = bytes.length;
    for (;;) {
      const head = parseHead(bytes);
      if (!('needBytes' in head)) {
        const reader = new ClipReader(head.header, head.index, fetchRange, cacheChunks);
        reader.bytesFetched = fetched;
        return reader;
      }
      if (head.needBytes <= bytes.length) throw new Error('clip header is damaged');
      bytes = await fetchRange(0, head.needBytes - 1);
      fetched += bytes.length;
    }
  }

  /** Opens a clip held in memory. */
  static fromBytes(bytes: Uint8Array, cacheChunks = 8): Promise<ClipReader> {
    return ClipReader.open(async (a, b) => bytes.subarray(a, Math.min(b + 1, bytes.length)), cacheChunks);
  }

  get frameCount() {
    return this.header.endFrame - this.header.startFrame + 1;
  }

  /** Index of the chunk that holds a shot frame. */
  chunkOf(frame: number): number {
    const h = this.header;
    if (!Number.isInteger(frame) || frame < h.startFrame || frame > h.endFrame) {
      throw new RangeError(`frame ${frame} is outside the clip (${h.startFrame}–${h.endFrame})`);
    }
    return Math.floor((frame - h.startFrame) / h.framesPerChunk);
  }

  /** Fetches and inflates a chunk (cached); call it ahead of the playhead to prefetch. */
  loadChunk(k: number): Promise<Uint8Array> {
    let p = this.cache.get(k);
    if (p) {
      this.cache.delete(k);
      this.cache.set(k, p);
      return p;
    }
    const e = this.index[k];
    p = this.fetchRange(e.offset, e.offset + e.length - 1).then((packed) => {
      this.bytesFetched += packed.length;
      return inflateSync(packed);
    });
    p.catch(() => this.cache.delete(k));
    this.cache.set(k, p);
    while (this.cache.size > this.cacheChunks) this.cache.delete(this.cache.keys().next().value!);
    return p;
  }

  /** Decodes one shot frame. */
  async frameAt(frame: number): Promise<ClipFrame> {
    const k = this.chunkOf(frame);
    const chunk = await this.loadChunk(k);
    return decodeFrame(this.header, chunk, frame - this.index[k].firstFrame, frame);
  }
}
