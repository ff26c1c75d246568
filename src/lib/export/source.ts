// Opens a baked clip for export or the share page: presigned URLs from an API call (asked again when they expire),
// frames read with HTTP Range requests, and the look options (rest density, top of the speed ramp) from the bake's
// statistics so every exported frame is coloured on the same scale.
import { refreshingRangeFetcher } from '../clip/fetch';
import { ClipReader } from '../clip/decode';
import type { ClipHeader } from '../clip/format';
import type { LookOptions, ParticleFrame } from '../render/looks';
import { loadPropImages, type PropPictureRef } from '../render/prop-pictures';
import type { FrameNeighbours } from '../render/motionBlur';

export interface ClipUrls {
  clipUrl: string;
  statsUrl: string | null;
  /** The pictures the version's props are drawn as (absent: fill colours). */
  propPictures?: PropPictureRef[];
}

export interface ParticleSource {
  header: ClipHeader;
  lookOptions: LookOptions;
  /** A frame of particles; an empty frame outside the baked range (handles past the bake show the plate alone). */
  frameAt(frame: number): Promise<ParticleFrame>;
}

const EMPTY: ParticleFrame = { count: 0, x: [], y: [], speed: [], maxSpeed: 0 };

interface StatsFile {
  frames: { count: number; liquidArea: number | null; maxSpeed: number }[];
}

/** Rest density (particles per m²) and top of the speed ramp (m/s) from the bake statistics. */
export function lookOptionsFromStats(stats: StatsFile | null): LookOptions {
  if (!stats?.frames?.length) return {};
  const measured = stats.frames.find((f) => typeof f.liquidArea === 'number' && Number.isFinite(f.liquidArea) && f.liquidArea > 0 && f.count > 0);
  const speeds = stats.frames.map((f) => f.maxSpeed).filter((v) => Number.isFinite(v) && v > 0);
  return {
    restDensity: measured ? measured.count / (measured.liquidArea as number) : undefined,
    speedScale: speeds.length ? Math.max(...speeds) : undefined,
  };
}

/** Opens the clip whose URLs `getUrls` returns (e.g. GET /api/versions/:id/clip or GET /api/shared/:token/clip). */
export async function openParticleSource(getUrls: () => Promise<ClipUrls>): Promise<ParticleSource> {
  let urls = await getUrls();
  let refreshing: Promise<ClipUrls> | null = null;
  const refresh = () => (refreshing ??= getUrls().then((u) => ((urls = u), (refreshing = null), u)));
  const fetchRange = refreshingRangeFetcher(() => urls.clipUrl, refresh);
  const reader = await ClipReader.open(fetchRange, 12);
  let stats: StatsFile | null = null;
  if (urls.statsUrl) {
    try {
      const res = await fetch(urls.statsUrl);
      if (res.ok) stats = (await res.json()) as StatsFile;
    } catch {
      stats = null; // the looks estimate their own scale without stats
    }
  }
  const h = reader.header;
  // A prop whose picture cannot be loaded is drawn in its fill colour rather than failing the export.
  const { images: propImages } = await loadPropImages(h.look, urls.propPictures);
  return {
    header: h,
    lookOptions: { ...lookOptionsFromStats(stats), scene: h.look, propImages },
    frameAt: (frame) => (frame < h.startFrame || frame > h.endFrame ? Promise.resolve(EMPTY) : reader.frameAt(frame)),
  };
}

/** Frame `f` (already read as `cur`) and its neighbours, for motion blur; a neighbour without particles (outside the bake) is null. */
export async function frameNeighbours(source: ParticleSource, f: number, cur: ParticleFrame): Promise<FrameNeighbours> {
  const { startFrame, endFrame } = source.header;
  const at = (k: number) => (k >= startFrame && k <= endFrame ? source.frameAt(k) : Promise.resolve(EMPTY));
  const [prev, next] = await Promise.all([at(f - 1), at(f + 1)]);
  return { prev: prev.count > 0 ? prev : null, cur, next: next.count > 0 ? next : null };
}
