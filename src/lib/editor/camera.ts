// The editor view's camera: tank metres (y up) ↔ screen pixels (y down), zoom about a point, fit a box, and the
// metres grid spacing for the zoom. screen x = ox + x·scale, screen y = oy − y·scale.
export interface Camera { ox: number; oy: number; /** screen pixels per metre */ scale: number }

export const toScreen = (c: Camera, x: number, y: number): [number, number] => [c.ox + x * c.scale, c.oy - y * c.scale];
export const toWorld = (c: Camera, sx: number, sy: number): [number, number] => [(sx - c.ox) / c.scale, (c.oy - sy) / c.scale];

/** The camera that shows the box [minX, maxX] × [minY, maxY] (m) centred in a view of w × h px with `margin` px around. */
export function fitBox(w: number, h: number, box: { minX: number; minY: number; maxX: number; maxY: number }, margin = 32): Camera {
  const bw = Math.max(box.maxX - box.minX, 1e-6), bh = Math.max(box.maxY - box.minY, 1e-6);
  const scale = Math.max(1e-3, Math.min((w - 2 * margin) / bw, (h - 2 * margin) / bh));
  return { scale, ox: w / 2 - ((box.minX + box.maxX) / 2) * scale, oy: h / 2 + ((box.minY + box.maxY) / 2) * scale };
}

/** Zooms by `factor` keeping the world point under screen point (sx, sy) in place; scale kept within [min, max]. */
export function zoomAt(c: Camera, sx: number, sy: number, factor: number, min = 5, max = 50_000): Camera {
  const scale = Math.min(max, Math.max(min, c.scale * factor));
  const [wx, wy] = toWorld(c, sx, sy);
  return { scale, ox: sx - wx * scale, oy: sy + wy * scale };
}

const STEPS = [0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100];

/** Grid spacing (m): the smallest step at least `minPx` screen pixels apart, and the labelled major step (×5 or ×10). */
export function gridSteps(scale: number, minPx = 18): { minor: number; major: number } {
  const minor = STEPS.find((s) => s * scale >= minPx) ?? STEPS[STEPS.length - 1];
  const i = STEPS.indexOf(minor);
  const major = STEPS[Math.min(STEPS.length - 1, i + 2)] ?? minor * 10;
  return { minor, major };
}
