// Loading the pictures a version's props are drawn as (the scene's `props[].picture`): the API names each prop's
// picture with a short-lived URL; the browser decodes it to straight-alpha RGBA and hands it to the looks as
// `LookOptions.propImages`, in the order of the clip look's props. Browser only (fetch, createImageBitmap, canvas).
import type { ClipLook } from '../clip/format';
import type { PropImage } from './solids';

/** One prop's picture as the API names it (GET /api/versions/:id/clip, the share page's media, the editor's list). */
export interface PropPictureRef {
  propId: string;
  pictureId: number;
  url: string;
  width: number;
  height: number;
}

/** Decoded pictures by id, shared by every viewer on the page (the compare view opens two versions of one shot). */
const decoded = new Map<number, Promise<PropImage>>();

/** Fetches and decodes a PNG or WebP to straight-alpha RGBA rows from the top. */
export async function decodePicture(url: string): Promise<PropImage> {
  const res = await fetch(url);
  if (!res.ok) throw new Error(`the picture could not be fetched (HTTP ${res.status})`);
  const bitmap = await createImageBitmap(await res.blob(), { premultiplyAlpha: 'none', colorSpaceConversion: 'none' });
  try {
    const { width, height } = bitmap;
    const canvas = typeof OffscreenCanvas !== 'undefined' ? new OffscreenCanvas(width, height) : Object.assign(document.createElement('canvas'), { width, height });
    const ctx = canvas.getContext('2d') as CanvasRenderingContext2D | OffscreenCanvasRenderingContext2D | null;
    if (!ctx) throw new Error('this browser cannot decode pictures');
    ctx.drawImage(bitmap, 0, 0);
    // ImageData is straight (not premultiplied) alpha, as PropImage wants.
    const data = ctx.getImageData(0, 0, width, height).data;
    return { width, height, data };
  } finally {
    bitmap.close();
  }
}

/** The decoded picture of `ref`, decoded once per page. */
export function pictureOf(ref: Pick<PropPictureRef, 'pictureId' | 'url'>): Promise<PropImage> {
  let p = decoded.get(ref.pictureId);
  if (!p) {
    p = decodePicture(ref.url);
    decoded.set(ref.pictureId, p);
    p.catch(() => decoded.delete(ref.pictureId)); // a failed fetch (an expired URL) may be tried again
  }
  return p;
}

/**
 * The `propImages` of a clip look: per prop of `look.props`, its decoded picture, or null (drawn in its fill colour:
 * none chosen, or it could not be loaded — `failed` lists those prop ids). Undefined when no prop has a picture.
 */
export async function loadPropImages(
  look: ClipLook | undefined,
  refs: readonly PropPictureRef[] | null | undefined,
): Promise<{ images: (PropImage | null)[] | undefined; failed: string[] }> {
  if (!look || !refs?.length) return { images: undefined, failed: [] };
  const byProp = new Map(refs.map((r) => [r.propId, r]));
  const failed: string[] = [];
  const images = await Promise.all(
    look.props.map(async (p) => {
      const ref = byProp.get(p.id);
      if (!ref) return null;
      try {
        return await pictureOf(ref);
      } catch {
        failed.push(p.id);
        return null;
      }
    }),
  );
  return { images: images.some((i) => i) ? images : undefined, failed };
}
