// The studio's prop pictures as the editor knows them: the list (GET /api/studios/:id/pictures), each picture decoded
// once for the view, and uploading a new one the way plates are uploaded (start → presigned POST → complete).
// A small controller outside React, as the live preview's is; panels and the view subscribe to it.
import { api, messageOf } from '../shared/api';
import { postWithProgress, type UploadForm } from '../shared/upload';
import { pictureOf } from '~/lib/render/prop-pictures';
import type { PropImage } from '~/lib/render/solids';
import { PICTURE_LIMITS, PICTURE_TYPES } from '~/lib/library/schemas';

export interface StudioPicture { id: number; fileName: string; contentType: string; width: number; height: number; byteSize: number; url: string }

export interface ShelfSnapshot {
  pictures: StudioPicture[];
  status: 'idle' | 'loading' | 'ready' | 'error';
  /** An upload in progress (0–1 while sending, null while the server checks it). */
  upload: { name: string; fraction: number | null } | null;
  message: string | null;
}

export class PictureShelf {
  private snap: ShelfSnapshot = { pictures: [], status: 'idle', upload: null, message: null };
  private readonly listeners = new Set<() => void>();
  private readonly images = new Map<number, PropImage>();
  private readonly decoding = new Set<number>();
  /** Bumped when a decoded picture arrives, so the view redraws. */
  imagesRevision = 0;

  constructor(private readonly studioId: number) {}

  subscribe = (fn: () => void) => {
    this.listeners.add(fn);
    return () => void this.listeners.delete(fn);
  };
  getSnapshot = () => this.snap;
  private set(patch: Partial<ShelfSnapshot>) {
    this.snap = { ...this.snap, ...patch };
    for (const fn of this.listeners) fn();
  }

  /** Loads (again) the studio's pictures; pictures decoded before stay decoded. */
  async load(): Promise<void> {
    this.set({ status: 'loading' });
    try {
      const r = await api<{ pictures: StudioPicture[] }>(`/api/studios/${this.studioId}/pictures`);
      this.set({ pictures: r.pictures, status: 'ready' });
    } catch (err) {
      this.set({ status: 'error', message: `The studio's prop pictures could not be listed: ${messageOf(err)}` });
    }
  }

  /** The decoded picture with this id, or null while it loads (the view is told when it arrives) or when unknown. */
  imageOf(id: number): PropImage | null {
    const done = this.images.get(id);
    if (done) return done;
    const listed = this.snap.pictures.find((p) => p.id === id);
    if (!listed || this.decoding.has(id)) return null;
    this.decoding.add(id);
    void pictureOf({ pictureId: id, url: listed.url }).then(
      (img) => {
        this.decoding.delete(id);
        this.images.set(id, img);
        this.imagesRevision++;
        for (const fn of this.listeners) fn();
      },
      (err) => this.set({ message: `The picture "${listed.fileName}" could not be shown: ${messageOf(err)}` }),
    );
    return null;
  }

  /** Uploads a PNG or WebP with alpha; resolves to the new picture (listed), or null with the reason in `message`. */
  async upload(file: File): Promise<StudioPicture | null> {
    if (!(PICTURE_TYPES as readonly string[]).includes(file.type)) {
      this.set({ message: `"${file.name}" is not a PNG or WebP: a prop picture is a cut-out with transparency, saved as PNG or WebP.` });
      return null;
    }
    if (file.size > PICTURE_LIMITS.bytes) {
      this.set({ message: `"${file.name}" is larger than the ${PICTURE_LIMITS.bytes / (1024 * 1024)} MB a prop picture may be.` });
      return null;
    }
    this.set({ upload: { name: file.name, fraction: 0 }, message: null });
    try {
      const started = await api<{ assetId: number; upload: UploadForm }>(`/api/studios/${this.studioId}/pictures`, {
        method: 'POST',
        body: { fileName: file.name, contentType: file.type, byteSize: file.size },
      });
      await postWithProgress(started.upload, file, (fraction) => this.set({ upload: { name: file.name, fraction } }));
      this.set({ upload: { name: file.name, fraction: null } });
      await api(`/api/studios/${this.studioId}/pictures/${started.assetId}/complete`, { method: 'POST', body: {} });
      await this.load();
      this.set({ upload: null });
      return this.snap.pictures.find((p) => p.id === started.assetId) ?? null;
    } catch (err) {
      this.set({ upload: null, message: messageOf(err) });
      return null;
    }
  }
}
