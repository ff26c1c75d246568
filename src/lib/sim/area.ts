// Liquid area: the area inside the ρ/ρ₀ = ½ iso-contour of the cell-centred particle density, by marching
// squares over cell centres (Lorensen & Cline 1987 in 3D; the 2D case is the usual "marching squares").
// Unlike Σ min(1, ρ/ρ₀)·h², it grows when the liquid spreads out and shrinks when it is compressed.

/** Scratch for one square's polygon: up to 8 vertices (x, y); module-level so no call allocates. */
const poly = new Float64Array(16);

/**
 * Fraction (0…1) of the unit square whose marching-squares polygon lies at or above `level`, for corner
 * values a at (0,0), b at (1,0), c at (1,1), d at (0,1). The polygon's vertices are the inside corners and
 * the level crossings on the edges, placed by linear interpolation; its area is the shoelace sum
 *   A = ½·Σ_k (x_k·y_{k+1} − x_{k+1}·y_k).
 * Saddles (two opposite corners inside) are resolved by the mean of the four corners: at or above the level
 * the two corners are joined (the hexagon of the boundary walk), below it they are two separate triangles.
 */
export function squareIsoArea(a: number, b: number, c: number, d: number, level: number): number {
  const ia = a >= level, ib = b >= level, ic = c >= level, id = d >= level;
  if (ia && ib && ic && id) return 1;
  if (!ia && !ib && !ic && !id) return 0;
  if (ia === ic && ib === id && ia !== ib && 0.25 * (a + b + c + d) < level) {
    // separated saddle: a right triangle at each inside corner, legs = distance to the crossings
    if (ia) return 0.5 * (leg(a, b, level) * leg(a, d, level) + leg(c, d, level) * leg(c, b, level));
    return 0.5 * (leg(b, a, level) * leg(b, c, level) + leg(d, c, level) * leg(d, a, level));
  }
  // walk the boundary counter-clockwise: corner (if inside), then the crossing on the edge that follows it
  let n = 0;
  if (ia) { poly[n++] = 0; poly[n++] = 0; }
  if (ia !== ib) { poly[n++] = (level - a) / (b - a); poly[n++] = 0; }
  if (ib) { poly[n++] = 1; poly[n++] = 0; }
  if (ib !== ic) { poly[n++] = 1; poly[n++] = (level - b) / (c - b); }
  if (ic) { poly[n++] = 1; poly[n++] = 1; }
  if (ic !== id) { poly[n++] = 1 - (level - c) / (d - c); poly[n++] = 1; }
  if (id) { poly[n++] = 0; poly[n++] = 1; }
  if (id !== ia) { poly[n++] = 0; poly[n++] = 1 - (level - d) / (a - d); }
  let s = 0;
  for (let k = 0; k < n; k += 2) {
    const k1 = k + 2 < n ? k + 2 : 0;
    s += poly[k] * poly[k1 + 1] - poly[k1] * poly[k + 1];
  }
  return 0.5 * s;
}

/** Distance (fraction of the edge) from an inside corner to the level crossing towards an outside corner. */
function leg(inside: number, outside: number, level: number): number {
  return (inside - level) / (inside - outside);
}

/** The grid fields the liquid area reads (cell c = i + nx·j, cell centres h apart). */
export interface AreaGrid {
  nx: number;
  ny: number;
  /** Cell size, m. */
  h: number;
  /** Particle density at cell centres (particles per cell). */
  dens: Float64Array;
  /** 1 for a solid cell. */
  solid: Uint8Array;
  /** Rest density ρ₀ (particles per cell); 0 when unknown. */
  restDensity: number;
}

/**
 * Liquid area in m²: the area inside the ½ρ₀ iso-contour of the density, with solids handled as
 * "liquid or solid" minus "solid": per square between four cell centres,
 *   A = h²·(area{φ ≥ ½} − area{s ≥ ½}),  φ_c = 1 in solid cells, else ρ_c/ρ₀;  s_c = 1 in solid cells, else 0.
 * A solid cell counts as full while contouring, so liquid resting against a wall or the tank side has no
 * contour there (a full tank reads its true area; the deposit's missing kernel mass beyond the wall does not
 * shave off a rim), and the solid's own ½-contour, the same cell-centred outline, is subtracted again.
 * `restDensity` defaults to the grid's ρ₀. Returns 0 while ρ₀ is unknown (no liquid seen yet).
 */
export function liquidArea(g: AreaGrid, restDensity = g.restDensity): number {
  const { nx, ny, h, dens, solid } = g;
  if (!(restDensity > 0)) return 0;
  const inv = 1 / restDensity;
  let sum = 0;
  for (let j = 0; j < ny - 1; j++) {
    let c = nx * j;
    // φ and s of the square's left corners carried along the row
    let s0 = solid[c], s3 = solid[c + nx];
    let f0 = s0 !== 0 ? 1 : dens[c] * inv, f3 = s3 !== 0 ? 1 : dens[c + nx] * inv;
    for (let i = 0; i < nx - 1; i++, c++) {
      const s1 = solid[c + 1], s2 = solid[c + nx + 1];
      const f1 = s1 !== 0 ? 1 : dens[c + 1] * inv, f2 = s2 !== 0 ? 1 : dens[c + nx + 1] * inv;
      const anySolid = (s0 | s1 | s2 | s3) !== 0;
      if (f0 >= 0.5 && f1 >= 0.5 && f2 >= 0.5 && f3 >= 0.5) {
        if (!anySolid) sum += 1;
        else sum += 1 - squareIsoArea(s0, s1, s2, s3, 0.5);
      } else if (f0 >= 0.5 || f1 >= 0.5 || f2 >= 0.5 || f3 >= 0.5) {
        sum += squareIsoArea(f0, f1, f2, f3, 0.5);
        if (anySolid) sum -= squareIsoArea(s0, s1, s2, s3, 0.5);
      }
      s0 = s1; s3 = s2; f0 = f1; f3 = f2;
    }
  }
  return sum * h * h;
}
