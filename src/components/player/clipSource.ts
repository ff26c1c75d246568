// Opens a baked clip over HTTP Range requests as the player's frame source; asks the API for fresh presigned URLs
// when the ones it has expire (they live 15 minutes).
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

  const fetchRange = async (start: number, end: number): Promise<Uint8Array> => {
    for (let attempt = 0; ; attempt++) {
      let res: Response | null = null;
      try {
        res = await fetch(info.clipUrl, { headers: { range: `bytes=${start}-${end}` } });
      } catch {
        res = null;
      }
      if (res && (res.status === 206 || res.status === 200)) {
        const bytes = new Uint8Array(await res.arrayBuffer());
        // A server that ignores Range answers 200 with the whole object: cut out the part asked for.
        return res.status === 200 && bytes.length > end - start + 1 ? bytes.subarray(start, end + 1) : bytes;
      }
      if (attempt >= 2) throw new Error(res ? `Could not read the baked clip (HTTP ${res.status})` : 'Could not reach the object store holding the baked clip');
      // An expired or refused URL (403/400) or a network hiccup: get fresh URLs and try again.
      await refresh();
    }
  };

  const reader = await ClipReader.open(fetchRange, 12);
  const h = reader.header;
  const source: FrameSource = {
    startFrame: h.startFrame,
    endFrame: h.endFrame,
    tankWidth: h.tankWidth,
    tankHeight: h.tankHeight,
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
