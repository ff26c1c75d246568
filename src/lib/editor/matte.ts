// Matte tracing: a black-and-white image (white = solid) or a painted mask becomes one polygon. Marching squares over
// the pixel centres (Lorensen & Cline 1987, the 2D case) gives closed outlines; the largest is simplified with
// Ramer–Douglas–Peucker (Douglas & Peucker 1973) to at most `maxPoints` points, then placed in tank metres.
import type { RgbaImage } from './png';
import { polygonSignedArea } from '../scene/shapes';
import type { Vec } from './geometry';

/** A binary mask: `data[y·width + x]` is 1 inside, 0 outside; rows from the top. */
export interface Mask { width: number; height: number; data: Uint8Array }

/** Inside where the pixel is light and opaque: luminance (Rec. 709 weights) × alpha ≥ ½; `invert` swaps the sides. */
export function maskFromImage(img: RgbaImage, invert = false): Mask {
  const data = new Uint8Array(img.width * img.height);
  for (let i = 0; i < data.length; i++) {
    const r = img.data[i * 4], g = img.data[i * 4 + 1], b = img.data[i * 4 + 2], a = img.data[i * 4 + 3];
    const lum = ((0.2126 * r + 0.7152 * g + 0.0722 * b) / 255) * (a / 255);
    data[i] = (lum >= 0.5) !== invert ? 1 : 0;
  }
  return { width: img.width, height: img.height, data };
}

/**
 * Closed outlines of the mask in pixel coordinates (x right, y down; pixel (i, j) covers [i, i+1] × [j, j+1], its
 * centre at (i + ½, j + ½)). Each crossing sits halfway between an inside and an outside pixel centre.
 */
export function traceOutlines(mask: Mask): Vec[][] {
  const { width: W, height: H, data } = mask;
  const at = (i: number, j: number) => (i < 0 || j < 0 || i >= W || j >= H ? 0 : data[j * W + i]);
  // Crossing ids: horizontal edge between samples (i, j)–(i+1, j) → 2·(j·(W+2)+i); vertical (i, j)–(i, j+1) → +1.
  const stride = W + 2;
  const hEdge = (i: number, j: number) => 2 * ((j + 1) * stride + (i + 1));
  const vEdge = (i: number, j: number) => 2 * ((j + 1) * stride + (i + 1)) + 1;
  const links = new Map<number, number[]>();
  const link = (a: number, b: number) => {
    (links.get(a) ?? links.set(a, []).get(a)!).push(b);
    (links.get(b) ?? links.set(b, []).get(b)!).push(a);
  };
  // Cells between sample rows/columns −1 … W−1 / H−1 (a one-sample border of outside closes every outline).
  for (let j = -1; j < H; j++) {
    for (let i = -1; i < W; i++) {
      const tl = at(i, j), tr = at(i + 1, j), br = at(i + 1, j + 1), bl = at(i, j + 1);
      const code = (tl << 3) | (tr << 2) | (br << 1) | bl;
      if (code === 0 || code === 15) continue;
      const top = hEdge(i, j), bottom = hEdge(i, j + 1), left = vEdge(i, j), right = vEdge(i + 1, j);
      switch (code) {
        case 1: case 14: link(left, bottom); break;
        case 2: case 13: link(bottom, right); break;
        case 3: case 12: link(left, right); break;
        case 4: case 11: link(top, right); break;
        case 6: case 9: link(top, bottom); break;
        case 7: case 8: link(left, top); break;
        // saddles: the two inside corners stay apart (4-connected inside)
        case 5: link(top, right); link(left, bottom); break;
        case 10: link(left, top); link(bottom, right); break;
      }
    }
  }
  const position = (id: number): Vec => {
    const cell = id >> 1, i = (cell % stride) - 1, j = Math.floor(cell / stride) - 1;
    // sample (i, j) is the centre of pixel (i, j): (i + ½, j + ½)
    return id & 1 ? [i + 0.5, j + 1] : [i + 1, j + 0.5];
  };
  const seen = new Set<number>();
  const loops: Vec[][] = [];
  for (const start of links.keys()) {
    if (seen.has(start)) continue;
    const loop: Vec[] = [];
    let prev = -1, cur = start;
    while (!seen.has(cur)) {
      seen.add(cur);
      loop.push(position(cur));
      const next = links.get(cur)!;
      const n = next[0] !== prev ? next[0] : next[1];
      prev = cur; cur = n;
    }
    if (loop.length >= 3) loops.push(loop);
  }
  return loops;
}

/** Perpendicular distance from p to the segment a–b. */
function segmentDistance(p: Vec, a: Vec, b: Vec): number {
  const ex = b[0] - a[0], ey = b[1] - a[1];
  const l2 = ex * ex + ey * ey;
  let t = l2 > 0 ? ((p[0] - a[0]) * ex + (p[1] - a[1]) * ey) / l2 : 0;
  t = Math.max(0, Math.min(1, t));
  return Math.hypot(p[0] - a[0] - t * ex, p[1] - a[1] - t * ey);
}

/** Ramer–Douglas–Peucker on an open polyline; keeps both ends. */
function simplifyOpen(pts: Vec[], tolerance: number): Vec[] {
  if (pts.length < 3) return pts;
  const keep = new Uint8Array(pts.length);
  keep[0] = keep[pts.length - 1] = 1;
  const stack: [number, number][] = [[0, pts.length - 1]];
  while (stack.length) {
    const [a, b] = stack.pop()!;
    let worst = -1, worstD = tolerance;
    for (let k = a + 1; k < b; k++) {
      const d = segmentDistance(pts[k], pts[a], pts[b]);
      if (d > worstD) { worst = k; worstD = d; }
    }
    if (worst >= 0) { keep[worst] = 1; stack.push([a, worst], [worst, b]); }
  }
  return pts.filter((_, k) => keep[k]);
}

/** Simplifies a closed outline to within `tolerance` (same units as the points). */
export function simplifyClosed(loop: Vec[], tolerance: number): Vec[] {
  if (loop.length <= 4) return loop;
  // split at the point farthest from the first, simplify both halves
  let far = 0, farD = -1;
  for (let k = 1; k < loop.length; k++) {
    const d = Math.hypot(loop[k][0] - loop[0][0], loop[k][1] - loop[0][1]);
    if (d > farD) { far = k; farD = d; }
  }
  const first = simplifyOpen(loop.slice(0, far + 1), tolerance);
  const second = simplifyOpen([...loop.slice(far), loop[0]], tolerance);
  return [...first.slice(0, -1), ...second.slice(0, -1)];
}

export interface TraceOptions {
  /** Largest deviation of the simplified outline, in pixels (default 0.6). */
  tolerancePx?: number;
  /** Most points the polygon may have (default 400; the scene allows 1000). */
  maxPoints?: number;
  /** Metres per mask pixel. */
  metresPerPixel: number;
  /** Tank coordinates (m) of the mask's lower-left corner. */
  originX: number;
  originY: number;
}

/** The mask's largest outline as a polygon in tank metres (y up), or null when the mask is empty. */
export function traceMatte(mask: Mask, options: TraceOptions): [number, number][] | null {
  const loops = traceOutlines(mask);
  if (!loops.length) return null;
  let best = loops[0], bestA = 0;
  for (const l of loops) { const a = Math.abs(polygonSignedArea(l)); if (a > bestA) { best = l; bestA = a; } }
  if (bestA <= 0) return null;
  const maxPoints = options.maxPoints ?? 400;
  let tol = options.tolerancePx ?? 0.6;
  let pts = simplifyClosed(best, tol);
  while (pts.length > maxPoints) { tol *= 1.5; pts = simplifyClosed(best, tol); }
  const { metresPerPixel: s, originX, originY } = options;
  const r6 = (v: number) => Math.round(v * 1e6) / 1e6;
  return pts.map((p) => [r6(originX + p[0] * s), r6(originY + (mask.height - p[1]) * s)]);
}
