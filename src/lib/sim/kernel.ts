// The one bilinear (tent) kernel every particle ↔ grid transfer uses: particles to the staggered faces,
// density to the cell centres, faces back to particles, and the viscosity's per-cell liquid mix.
// Grid coordinates: X = x/h + 1 (cells, the grid's one-cell border included), clamped to [1, n − 1].
// A node set sits at offset (ox, oy) cells from the cell corners: u faces (0, ½), v faces (½, 0),
// centres (½, ½). The four nodes around a point are n0, n0 + 1, n0 + nx + 1, n0 + nx with weights
//   w0 = (1 − tx)(1 − ty), w1 = tx(1 − ty), w2 = tx·ty, w3 = (1 − tx)·ty,
// always visited in that order, so every transfer rounds exactly as its hand-written loop did.

/** Offsets (cells) of the node sets from the cell corners. */
export const U_FACES = [0, 0.5] as const;
export const V_FACES = [0.5, 0] as const;
export const CENTRES = [0.5, 0.5] as const;

/** A reusable stencil: place it at a point (at), pick a node set (nodes), then splat or gather. */
export class Bilinear {
  /** Clamped grid coordinates of the last point (cells). */
  X = 0; Y = 0;
  /** Base node and weights of the last stencil. */
  n0 = 0; w0 = 0; w1 = 0; w2 = 0; w3 = 0;
  private readonly xMax: number; private readonly yMax: number;
  private readonly iMax: number; private readonly jMax: number;

  constructor(readonly nx: number, ny: number, readonly invH: number) {
    this.xMax = nx - 1; this.yMax = ny - 1; this.iMax = nx - 2; this.jMax = ny - 2;
  }

  /** Places the stencil at tank point (x, y) m; returns the index of the cell holding it. */
  at(x: number, y: number): number {
    let X = x * this.invH + 1, Y = y * this.invH + 1;
    X = X < 1 ? 1 : X > this.xMax ? this.xMax : X;
    Y = Y < 1 ? 1 : Y > this.yMax ? this.yMax : Y;
    this.X = X; this.Y = Y;
    return (X | 0) + this.nx * (Y | 0);
  }

  /** Stencil of the node set at offset (ox, oy) cells around the current point. */
  nodes(ox: number, oy: number): void {
    const fx = this.X - ox, fy = this.Y - oy;
    let i0 = fx | 0; if (i0 > this.iMax) i0 = this.iMax;
    let j0 = fy | 0; if (j0 > this.jMax) j0 = this.jMax;
    const tx = fx - i0, ty = fy - j0;
    this.n0 = i0 + this.nx * j0;
    this.w0 = (1 - tx) * (1 - ty); this.w1 = tx * (1 - ty); this.w2 = tx * ty; this.w3 = (1 - tx) * ty;
  }

  /** field += value·w and weight += w on the four nodes. */
  splat(field: Float64Array, weight: Float64Array, value: number): void {
    const n0 = this.n0, nx = this.nx;
    let w = this.w0; field[n0] += value * w; weight[n0] += w;
    w = this.w1; field[n0 + 1] += value * w; weight[n0 + 1] += w;
    w = this.w2; field[n0 + nx + 1] += value * w; weight[n0 + nx + 1] += w;
    w = this.w3; field[n0 + nx] += value * w; weight[n0 + nx] += w;
  }

  /** weight += w on the four nodes (a density deposit). */
  splatWeight(weight: Float64Array): void {
    const n0 = this.n0, nx = this.nx;
    weight[n0] += this.w0;
    weight[n0 + 1] += this.w1;
    weight[n0 + nx + 1] += this.w2;
    weight[n0 + nx] += this.w3;
  }

  /**
   * The particle-to-grid deposit at the current point in one call: value u on the u faces (field fu, weight wu),
   * v on the v faces (fv, wv) and a density deposit on the centres (dens). The same weights, in the same order,
   * as nodes(U_FACES) + splat, nodes(V_FACES) + splat, nodes(CENTRES) + splatWeight.
   */
  splatFacesAndCentre(fu: Float64Array, wu: Float64Array, u: number, fv: Float64Array, wv: Float64Array, v: number, dens: Float64Array): void {
    const nx = this.nx, iMax = this.iMax, jMax = this.jMax;
    // one-dimensional stencils: at the point (offset 0) and half a cell back (offset ½), in x and in y
    const ax = this.X, ay = this.Y, bx = this.X - 0.5, by = this.Y - 0.5;
    let ia = ax | 0; if (ia > iMax) ia = iMax;
    let ib = bx | 0; if (ib > iMax) ib = iMax;
    let ja = ay | 0; if (ja > jMax) ja = jMax;
    let jb = by | 0; if (jb > jMax) jb = jMax;
    const sa = ax - ia, sb = bx - ib, ta = ay - ja, tb = by - jb;
    // u faces: (a, b); v faces: (b, a); centres: (b, b)
    let n0 = ia + nx * jb;
    let w = (1 - sa) * (1 - tb); fu[n0] += u * w; wu[n0] += w;
    w = sa * (1 - tb); fu[n0 + 1] += u * w; wu[n0 + 1] += w;
    w = sa * tb; fu[n0 + nx + 1] += u * w; wu[n0 + nx + 1] += w;
    w = (1 - sa) * tb; fu[n0 + nx] += u * w; wu[n0 + nx] += w;
    n0 = ib + nx * ja;
    w = (1 - sb) * (1 - ta); fv[n0] += v * w; wv[n0] += w;
    w = sb * (1 - ta); fv[n0 + 1] += v * w; wv[n0 + 1] += w;
    w = sb * ta; fv[n0 + nx + 1] += v * w; wv[n0 + nx + 1] += w;
    w = (1 - sb) * ta; fv[n0 + nx] += v * w; wv[n0 + nx] += w;
    n0 = ib + nx * jb;
    dens[n0] += (1 - sb) * (1 - tb);
    dens[n0 + 1] += sb * (1 - tb);
    dens[n0 + nx + 1] += sb * tb;
    dens[n0 + nx] += (1 - sb) * tb;
  }

  /** Σ w·field over the four nodes. */
  gather(field: Float64Array): number {
    const n0 = this.n0, nx = this.nx;
    return this.w0 * field[n0] + this.w1 * field[n0 + 1] + this.w2 * field[n0 + nx + 1] + this.w3 * field[n0 + nx];
  }
}
