// Opens a baked clip over HTTP Range requests as the player's frame source; asks the API for fresh presigned URLs
// when the ones it has expire (they live 15 minutes).
import { refreshingRangeFetcher } from '~/lib/clip/fetch';
import { ClipReader } from '~/lib/clip/decode';
import { api } from '../shared/api';
import type { FrameSource } from './engine';
import type { ClipInfo } from './types';

export interface OpenedClip {
  reader: ClipReader;
  source: FrameSource;
  /** The URLs in use (the stats URL is read once, right after opening). */
  info: ClipInfo;
}

/** Opens the clip of a version; `initial` (URLs made with the page) saves a round trip. */
export async function openClip(versionId: number, initial: ClipInfo | null): Promise<OpenedClip> {
  let info = initial ?? (await api<ClipInfo>(`/api/versions/${versionId}/clip`));
  let refreshing: Promise<ClipInfo> | null = null;
  const refresh = () => (refreshing ??= api<ClipInfo>(`/api/versions/${versionId}/clip`).then((fresh) => ((info = fresh), (refreshing = null), fresh)));

  const fetchRange = refreshingRangeFetcher(() => info.clipUrl, refresh);

  const reader = await ClipReader.open(fetchRange, 12);
  const h = reader.header;
  const source: FrameSource = {
    startFrame: h.startFrame,
    endFrame: h.endFrame,
    tankWidth: h.tankWidth,
    tankHeight: h.tankHeight,
    look: h.look,
    frameAt: (f) => reader.frameAt(f),
    prefetch(frame) {
      const k = reader.chunkOf(Math.max(h.startFrame, Math.min(h.endFrame, frame)));
      for (const c of [k, k + 1, k - 1]) if (c >= 0 && c < h.chunkCount) void reader.loadChunk(c).catch(() => undefined);
    },
  };
  return { reader, source, info };
}

/** Fetches the bake statistics JSON (null when the clip has none or it can't be read). */
export async function loadStats<T>(statsUrl: string | null): Promise<T | null> {
  if (!statsUrl) return null;
  try {
    const res = await fetch(statsUrl);
    return res.ok ? ((await res.json()) as T) : null;
  } catch {
    return null;
  }
}
