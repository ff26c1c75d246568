// Geometry of the scene's shapes (rect, circle, polygon) in tank metres, y up.
// Pure functions: area (m²), centroid (m), inside tests, signed distance (m) and bounds.

export interface RectShape { type: 'rect'; x: number; y: number; width: number; height: number }
export interface CircleShape { type: 'circle'; x: number; y: number; radius: number }
export interface PolygonShape { type: 'polygon'; points: [number, number][] }
export type Shape = RectShape | CircleShape | PolygonShape;

export interface Bounds { minX: number; minY: number; maxX: number; maxY: number }

/** Signed area of a polygon (m²): positive when the points run counter-clockwise (shoelace formula). */
export function polygonSignedArea(points: readonly (readonly [number, number])[]): number {
  let a = 0;
  for (let i = 0, n = points.length; i < n; i++) {
    const p = points[i], q = points[(i + 1) % n];
    a += p[0] * q[1] - q[0] * p[1];
  }
  return 0.5 * a;
}

/** Area of the shape in m². */
export function shapeArea(shape: Shape): number {
  switch (shape.type) {
    case 'rect': return shape.width * shape.height;
    case 'circle': return Math.PI * shape.radius * shape.radius;
    case 'polygon': return Math.abs(polygonSignedArea(shape.points));
  }
}

/** Centroid (centre of area) of the shape, metres. Polygon: standard area-weighted formula. */
export function shapeCentroid(shape: Shape): [number, number] {
  switch (shape.type) {
    case 'rect': return [shape.x + 0.5 * shape.width, shape.y + 0.5 * shape.height];
    case 'circle': return [shape.x, shape.y];
    case 'polygon': {
      // C = 1/(6A) Σ (p_i + p_{i+1}) (x_i y_{i+1} − x_{i+1} y_i)
      const pts = shape.points;
      let a = 0, cx = 0, cy = 0;
      for (let i = 0, n = pts.length; i < n; i++) {
        const p = pts[i], q = pts[(i + 1) % n];
        const cross = p[0] * q[1] - q[0] * p[1];
        a += cross; cx += (p[0] + q[0]) * cross; cy += (p[1] + q[1]) * cross;
      }
      if (a === 0) { // degenerate: mean of the vertices
        let mx = 0, my = 0;
        for (const p of pts) { mx += p[0]; my += p[1]; }
        return [mx / pts.length, my / pts.length];
      }
      return [cx / (3 * a), cy / (3 * a)];
    }
  }
}

/** Axis-aligned bounds of the shape, metres. */
export function shapeBounds(shape: Shape): Bounds {
  switch (shape.type) {
    case 'rect': return { minX: shape.x, minY: shape.y, maxX: shape.x + shape.width, maxY: shape.y + shape.height };
    case 'circle': return { minX: shape.x - shape.radius, minY: shape.y - shape.radius, maxX: shape.x + shape.radius, maxY: shape.y + shape.radius };
    case 'polygon': {
      let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
      for (const p of shape.points) {
        if (p[0] < minX) minX = p[0];
        if (p[0] > maxX) maxX = p[0];
        if (p[1] < minY) minY = p[1];
        if (p[1] > maxY) maxY = p[1];
      }
      return { minX, minY, maxX, maxY };
    }
  }
}

/** True when (x, y) lies inside the shape (boundary counts as inside for rect and circle). */
export function pointInShape(shape: Shape, x: number, y: number): boolean {
  switch (shape.type) {
    case 'rect': return x >= shape.x && x <= shape.x + shape.width && y >= shape.y && y <= shape.y + shape.height;
    case 'circle': {
      const dx = x - shape.x, dy = y - shape.y;
      return dx * dx + dy * dy <= shape.radius * shape.radius;
    }
    case 'polygon': return pointInPolygon(shape.points, x, y);
  }
}

/** Even–odd crossing test; works for either orientation of a simple polygon. */
export function pointInPolygon(pts: readonly (readonly [number, number])[], x: number, y: number): boolean {
  let inside = false;
  for (let i = 0, n = pts.length, j = n - 1; i < n; j = i++) {
    const xi = pts[i][0], yi = pts[i][1], xj = pts[j][0], yj = pts[j][1];
    if ((yi > y) !== (yj > y) && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/**
 * Signed distance (m) from (x, y) to the shape's boundary: negative inside, positive outside.
 * Writes the outward unit normal at the closest boundary point into `normal[0..1]`
 * (the closest point is (x, y) − distance·normal).
 */
export function shapeSignedDistance(shape: Shape, x: number, y: number, normal: { [index: number]: number }): number {
  switch (shape.type) {
    case 'circle': {
      const dx = x - shape.x, dy = y - shape.y;
      const d = Math.sqrt(dx * dx + dy * dy);
      if (d > 0) { normal[0] = dx / d; normal[1] = dy / d; } else { normal[0] = 0; normal[1] = 1; }
      return d - shape.radius;
    }
    case 'rect': {
      const hx = 0.5 * shape.width, hy = 0.5 * shape.height;
      const px = x - (shape.x + hx), py = y - (shape.y + hy);
      const qx = Math.abs(px) - hx, qy = Math.abs(py) - hy;
      if (qx > 0 || qy > 0) { // outside: distance to the box
        const ox = qx > 0 ? qx : 0, oy = qy > 0 ? qy : 0;
        const d = Math.sqrt(ox * ox + oy * oy);
        normal[0] = (px < 0 ? -ox : ox) / d; normal[1] = (py < 0 ? -oy : oy) / d;
        return d;
      }
      // inside: nearest side
      if (qx > qy) { normal[0] = px < 0 ? -1 : 1; normal[1] = 0; return qx; }
      normal[0] = 0; normal[1] = py < 0 ? -1 : 1; return qy;
    }
    case 'polygon': {
      const pts = shape.points;
      let best = Infinity, nx = 0, ny = 1;
      for (let i = 0, n = pts.length, j = n - 1; i < n; j = i++) {
        const ax = pts[j][0], ay = pts[j][1], bx = pts[i][0], by = pts[i][1];
        const ex = bx - ax, ey = by - ay;
        const len2 = ex * ex + ey * ey;
        let t = len2 > 0 ? ((x - ax) * ex + (y - ay) * ey) / len2 : 0;
        t = t < 0 ? 0 : t > 1 ? 1 : t;
        const dx = x - (ax + t * ex), dy = y - (ay + t * ey);
        const d2 = dx * dx + dy * dy;
        if (d2 < best) { best = d2; nx = dx; ny = dy; }
      }
      const d = Math.sqrt(best);
      const inside = pointInPolygon(pts, x, y);
      if (d > 0) { nx /= d; ny /= d; } else { nx = 0; ny = 1; }
      // The vector from the boundary to the point points outward when outside, inward when inside.
      if (inside) { normal[0] = -nx; normal[1] = -ny; return -d; }
      normal[0] = nx; normal[1] = ny; return d;
    }
  }
}
