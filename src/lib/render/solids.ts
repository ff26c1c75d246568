// Walls and props as the player, exports and share page draw them: outlines in view pixels from a clip's drawing
// facts (src/lib/clip/format.ts ClipLook) and a frame's prop poses, plus a CPU rasteriser for the export images.
// The player hands the same outlines to pixi (src/components/player/gpuLooks.ts). Free of React and the DOM.
import type { ClipLook, PropPose } from '../clip/format';
import { shapeBounds, type Shape } from '../scene/shapes';
import type { PixelImage } from './image';
import type { TankToView } from './view';

/** One solid to draw: a closed outline in view pixels (x, y pairs), its fill (or none) and its line. */
export interface SolidOutline {
  kind: 'wall' | 'prop';
  id: string;
  /** View px, [x0, y0, x1, y1, …], y down. */
  points: Float64Array;
  /** [r, g, b] 0–255 and alpha 0–1, or null: not filled. */
  fill: readonly [number, number, number, number] | null;
  line: readonly [number, number, number, number];
  /** Line width in view px. */
  lineWidth: number;
  /** A prop's picture drawn in place of its fill (inside the outline only), with the view → picture mapping. */
  image?: { picture: PropImage; toPicture: PictureMapping };
}

/**
 * A prop's picture (a cut-out photo of the product with alpha): straight-alpha RGBA rows from the top, fitted to the
 * bounds of the prop's drawn shape (its top row along the shape's top), and turned and moved with the prop.
 */
export interface PropImage {
  width: number;
  height: number;
  data: Uint8Array | Uint8ClampedArray;
}

/** Affine map from a view point (px) to picture pixels: u = a·x + b·y + c, v = d·x + e·y + f. */
export type PictureMapping = readonly [number, number, number, number, number, number];

/**
 * The view → picture mapping of a prop at its pose: a view point goes back to tank metres, then back to the drawn
 * pose (p = R(−angle)·(q − pose) + centroid), then across the shape's bounds to the picture's pixels (v down).
 */
export function propPictureMapping(shape: Shape, centroid: readonly [number, number], pose: PropPose, t: TankToView, picture: PropImage): PictureMapping {
  const { minX, minY, maxX, maxY } = shapeBounds(shape);
  const a = (-pose.angle * Math.PI) / 180;
  const c = Math.cos(a), s = Math.sin(a);
  const at = (vx: number, vy: number): [number, number] => {
    const qx = (vx - t.ox) / t.sx - pose.x, qy = (t.oy - vy) / t.sy - pose.y;
    const px = c * qx - s * qy + centroid[0], py = s * qx + c * qy + centroid[1];
    return [((px - minX) / Math.max(maxX - minX, 1e-12)) * picture.width, ((maxY - py) / Math.max(maxY - minY, 1e-12)) * picture.height];
  };
  const [u0, v0] = at(0, 0), [u1, v1] = at(1, 0), [u2, v2] = at(0, 1);
  return [u1 - u0, u2 - u0, u0, v1 - v0, v2 - v0, v0];
}

/** Wall colours: a sand line, and a dark slate fill when the style is 'fill'. */
export const WALL_LINE: readonly [number, number, number, number] = [240, 232, 214, 0.9];
export const WALL_FILL: readonly [number, number, number, number] = [52, 66, 72, 0.88];

/** Segments of a circle's outline: enough that the chord error stays under 0.1 px up to a 400 px radius. */
function circleSegments(radiusPx: number): number {
  return Math.max(24, Math.min(256, Math.ceil(Math.PI / Math.acos(Math.max(0, 1 - 0.1 / Math.max(radiusPx, 1))))));
}

/** The shape's outline in tank metres (rect corners counter-clockwise; circles as polygons of `segments`). */
function shapePoints(shape: Shape, segments: number): [number, number][] {
  switch (shape.type) {
    case 'rect':
      return [[shape.x, shape.y], [shape.x + shape.width, shape.y], [shape.x + shape.width, shape.y + shape.height], [shape.x, shape.y + shape.height]];
    case 'circle':
      return Array.from({ length: segments }, (_, k) => {
        const a = (2 * Math.PI * k) / segments;
        return [shape.x + shape.radius * Math.cos(a), shape.y + shape.radius * Math.sin(a)] as [number, number];
      });
    case 'polygon':
      return shape.points;
  }
}

function parseHex(hex: string): [number, number, number] {
  const v = parseInt(hex.slice(1), 16);
  return [(v >> 16) & 255, (v >> 8) & 255, v & 255];
}

/** #RRGGBB → [r, g, b] 0–255 (cached: the looks ask for the same few colours every frame). */
const hexCache = new Map<string, [number, number, number]>();
export function hexColour(hex: string): [number, number, number] {
  let c = hexCache.get(hex);
  if (!c) hexCache.set(hex, (c = parseHex(hex)));
  return c;
}

/**
 * Outlines of the walls (unless the style hides them) and of every prop at its pose in the frame, in view pixels:
 * a prop's drawn point p lands at R(angle)·(p − centroid) + (x, y). Props without a pose (none given) are left out.
 */
export function solidOutlines(look: ClipLook, poses: readonly PropPose[] | undefined, t: TankToView, pictures?: readonly (PropImage | null | undefined)[]): SolidOutline[] {
  const out: SolidOutline[] = [];
  const toView = (pts: [number, number][], place: (x: number, y: number) => [number, number]) => {
    const a = new Float64Array(2 * pts.length);
    pts.forEach(([x, y], k) => {
      const [wx, wy] = place(x, y);
      a[2 * k] = t.ox + wx * t.sx;
      a[2 * k + 1] = t.oy - wy * t.sy;
    });
    return a;
  };
  const segs = (s: Shape) => (s.type === 'circle' ? circleSegments(s.radius * t.sx) : 0);
  if (look.wallStyle !== 'hidden') {
    for (const w of look.walls) {
      out.push({
        kind: 'wall', id: w.id, points: toView(shapePoints(w.shape, segs(w.shape)), (x, y) => [x, y]),
        fill: look.wallStyle === 'fill' ? WALL_FILL : null, line: WALL_LINE, lineWidth: 2,
      });
    }
  }
  look.props.forEach((p, k) => {
    const pose = poses?.[k];
    if (!pose) return;
    const a = (pose.angle * Math.PI) / 180;
    const c = Math.cos(a), s = Math.sin(a);
    const [cx, cy] = p.centroid;
    const [r, g, b] = hexColour(p.colour);
    const picture = pictures?.[k];
    out.push({
      ...(picture ? { image: { picture, toPicture: propPictureMapping(p.shape, p.centroid, pose, t, picture) } } : {}),
      kind: 'prop', id: p.id,
      points: toView(shapePoints(p.shape, segs(p.shape)), (x, y) => [c * (x - cx) - s * (y - cy) + pose.x, s * (x - cx) + c * (y - cy) + pose.y]),
      fill: [r, g, b, 1],
      // A darker rim of the prop's own colour, so a prop reads as an object over liquid of a similar colour.
      line: [r * 0.45, g * 0.45, b * 0.45, 1], lineWidth: 1.5,
    });
  });
  return out;
}

/** Bounds of an outline's points, view px. */
export function outlineBounds(pts: Float64Array): { minX: number; minY: number; maxX: number; maxY: number } {
  let minY = Infinity, maxY = -Infinity, minX = Infinity, maxX = -Infinity;
  for (let k = 0; k < pts.length; k += 2) {
    minX = Math.min(minX, pts[k]); maxX = Math.max(maxX, pts[k]);
    minY = Math.min(minY, pts[k + 1]); maxY = Math.max(maxY, pts[k + 1]);
  }
  return { minX, minY, maxX, maxY };
}

/** The outline's points as [x, y] pairs (for the scene's point-in-polygon test). */
export function outlinePairs(pts: Float64Array): [number, number][] {
  const out: [number, number][] = [];
  for (let k = 0; k < pts.length; k += 2) out.push([pts[k], pts[k + 1]]);
  return out;
}

/** Blends a colour (0–255, alpha 0–1) over a premultiplied pixel ("over"). */
export function blendOver(pixels: Uint32Array, p: number, r: number, g: number, b: number, a: number) {
  const d = pixels[p];
  const k = 1 - a;
  const dr = d & 255, dg = (d >> 8) & 255, db = (d >> 16) & 255, da = d >>> 24;
  pixels[p] = (((a * 255 + da * k + 0.5) << 24) | ((b * a + db * k + 0.5) << 16) | ((g * a + dg * k + 0.5) << 8) | (r * a + dr * k + 0.5)) >>> 0;
}

/** Blends the picture's texel nearest to each pixel centre of a span [x0, x1] of row py (picture alpha, straight). */
function blendPictureSpan(pixels: Uint32Array, width: number, py: number, x0: number, x1: number, image: NonNullable<SolidOutline['image']>) {
  const { picture, toPicture: [a, b, c, d, e, f] } = image;
  const { width: pw, height: ph, data } = picture;
  const yc = py + 0.5;
  for (let px = x0, row = py * width; px <= x1; px++) {
    const xc = px + 0.5;
    const u = Math.floor(a * xc + b * yc + c), v = Math.floor(d * xc + e * yc + f);
    const q = 4 * ((v < 0 ? 0 : v >= ph ? ph - 1 : v) * pw + (u < 0 ? 0 : u >= pw ? pw - 1 : u));
    const alpha = data[q + 3] / 255;
    if (alpha > 0) blendOver(pixels, row + px, data[q], data[q + 1], data[q + 2], alpha);
  }
}

/**
 * Draws the outlines into a premultiplied image: each fill (or prop picture) by even–odd scanlines at pixel centres, then its line
 * (pixels whose centre lies within lineWidth/2 of an edge). Returns the image.
 */
export function drawSolids(image: PixelImage, solids: readonly SolidOutline[]): PixelImage {
  const { width, height, pixels } = image;
  const xs: number[] = [];
  for (const s of solids) {
    const pts = s.points;
    const n = pts.length / 2;
    if (n < 3) continue;
    const { minX, minY, maxX, maxY } = outlineBounds(pts);
    if (s.fill || s.image) {
      const [r, g, b, a] = s.fill ?? [0, 0, 0, 0];
      for (let py = Math.max(0, Math.floor(minY)); py <= Math.min(height - 1, Math.ceil(maxY)); py++) {
        const yc = py + 0.5;
        xs.length = 0;
        for (let k = 0, j = n - 1; k < n; j = k++) {
          const y0 = pts[2 * j + 1], y1 = pts[2 * k + 1];
          if ((y0 > yc) !== (y1 > yc)) xs.push(pts[2 * j] + ((yc - y0) / (y1 - y0)) * (pts[2 * k] - pts[2 * j]));
        }
        xs.sort((p, q) => p - q);
        for (let q = 0; q + 1 < xs.length; q += 2) {
          // Pixel centres px + ½ inside [xs[q], xs[q+1]).
          const x0 = Math.max(0, Math.ceil(xs[q] - 0.5));
          const x1 = Math.min(width - 1, Math.ceil(xs[q + 1] - 0.5) - 1);
          if (s.image) blendPictureSpan(pixels, width, py, x0, x1, s.image);
          else for (let px = x0, row = py * width; px <= x1; px++) blendOver(pixels, row + px, r, g, b, a);
        }
      }
    }
    const [r, g, b, a] = s.line;
    const half = s.lineWidth / 2;
    const x0 = Math.max(0, Math.floor(minX - half)), x1 = Math.min(width - 1, Math.ceil(maxX + half));
    const y0 = Math.max(0, Math.floor(minY - half)), y1 = Math.min(height - 1, Math.ceil(maxY + half));
    for (let k = 0, j = n - 1; k < n; j = k++) {
      const ax = pts[2 * j], ay = pts[2 * j + 1], bx = pts[2 * k], by = pts[2 * k + 1];
      const ex = bx - ax, ey = by - ay;
      const len2 = ex * ex + ey * ey || 1;
      const sx0 = Math.max(x0, Math.floor(Math.min(ax, bx) - half)), sx1 = Math.min(x1, Math.ceil(Math.max(ax, bx) + half));
      const sy0 = Math.max(y0, Math.floor(Math.min(ay, by) - half)), sy1 = Math.min(y1, Math.ceil(Math.max(ay, by) + half));
      for (let py = sy0; py <= sy1; py++) {
        for (let px = sx0; px <= sx1; px++) {
          const cx = px + 0.5 - ax, cy = py + 0.5 - ay;
          let u = (cx * ex + cy * ey) / len2;
          u = u < 0 ? 0 : u > 1 ? 1 : u;
          const dx = cx - u * ex, dy = cy - u * ey;
          // Every vertex ends one segment and starts the next: count it on the segment it ends (blend a pixel once).
          if (dx * dx + dy * dy > half * half || u === 0) continue;
          blendOver(pixels, py * width + px, r, g, b, a);
        }
      }
    }
  }
  return image;
}
