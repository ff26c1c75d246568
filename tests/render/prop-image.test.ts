// Pixel test of a prop drawn as a picture with alpha (a cut-out photo of the product) in the CPU look: the picture
// is fitted to the prop's drawn shape, turned and moved with its pose, and drawn inside the prop's outline only.
import { describe, it, expect } from 'vitest';
import { LookRenderer, type ParticleFrame } from '../../src/lib/render/looks';
import { layoutView } from '../../src/lib/render/view';
import type { ClipLook, PropPose } from '../../src/lib/clip/format';

const W = 400, H = 200;
const { toView } = layoutView({ viewWidth: W, viewHeight: H, tankWidth: 1, tankHeight: 0.5 });

// A round prop of radius 0.08 m drawn at (0.3, 0.25), shown at (0.6, 0.25) turned 30° counter-clockwise.
const R = 0.08;
const prop = { id: 'can', shape: { type: 'circle' as const, x: 0.3, y: 0.25, radius: R }, centroid: [0.3, 0.25] as [number, number], colour: '#20C040' };
const pose: PropPose = { x: 0.6, y: 0.25, angle: 30 };
const look: ClipLook = { liquids: [{ id: 'water', colour: '#3A8FB7' }], walls: [], wallStyle: 'outline', props: [prop] };
const frame: ParticleFrame = { count: 0, x: [], y: [], speed: [], maxSpeed: 0, props: [pose] };

// The picture, 40 × 40, square over the circle's bounds: its left half opaque magenta with the top-left quarter
// opaque yellow; its right half transparent.
const PW = 40;
const MAGENTA = [230, 20, 210], YELLOW = [250, 220, 10];
const picture = { width: PW, height: PW, data: new Uint8Array(PW * PW * 4) };
for (let v = 0; v < PW; v++) {
  for (let u = 0; u < PW / 2; u++) {
    const c = v < PW / 2 ? YELLOW : MAGENTA;
    picture.data.set([...c, 255], 4 * (v * PW + u));
  }
}

/** Where a view pixel centre falls in the prop's own frame (m from its centre, x right and y up in the drawn pose). */
function local(x: number, y: number): [number, number] {
  const tx = (x - toView.ox) / toView.sx - pose.x, ty = (toView.oy - y) / toView.sy - pose.y;
  const a = (-30 * Math.PI) / 180;
  return [Math.cos(a) * tx - Math.sin(a) * ty, Math.sin(a) * tx + Math.cos(a) * ty];
}

const near = (p: number[], c: number[], tol = 12) => Math.abs(p[0] - c[0]) <= tol && Math.abs(p[1] - c[1]) <= tol && Math.abs(p[2] - c[2]) <= tol;

describe('a prop drawn as a picture with alpha', () => {
  const img = new LookRenderer(W, H).render('surface', frame, toView, { scene: look, propImages: [picture] });
  const at = (x: number, y: number) => {
    const p = 4 * (y * W + x);
    return [img.data[p], img.data[p + 1], img.data[p + 2], img.data[p + 3]];
  };
  const rPx = R * toView.sx;

  it('draws picture colours inside the outline only, and nothing where the picture is transparent', () => {
    let drawnOutside = 0, wrongInside = 0, opaqueInside = 0, clearInside = 0;
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const [lx, ly] = local(x + 0.5, y + 0.5);
        const d = Math.hypot(lx, ly) * toView.sx; // px from the prop's centre
        const p = at(x, y);
        const pictureColour = near(p, MAGENTA) || near(p, YELLOW);
        // Outside the outline and its 1.5 px rim nothing at all; the picture's corners beyond the circle stay clear.
        if (d > rPx + 1.5 && p[3] !== 0) drawnOutside++;
        if (d > rPx + 0.5 && pictureColour) drawnOutside++;
        if (d >= rPx - 2) continue; // the rim
        // Inside: the picture's texel there, by geometry (left half opaque, top-left quarter yellow).
        const left = lx < 0, top = ly > 0;
        if (Math.abs(lx) * toView.sx < 1.5 || Math.abs(ly) * toView.sx < 1.5) continue; // texel boundaries
        if (left) {
          opaqueInside++;
          if (!near([p[0], p[1], p[2]], top ? YELLOW : MAGENTA) || p[3] !== 255) wrongInside++;
        } else {
          clearInside++;
          if (p[3] !== 0) wrongInside++;
        }
      }
    }
    // The circle is some 2,000 px²: both halves are well sampled.
    expect(opaqueInside).toBeGreaterThan(600);
    expect(clearInside).toBeGreaterThan(600);
    expect(drawnOutside).toBe(0);
    expect(wrongInside).toBe(0);
  });

  it('falls back to the fill colour without a picture', () => {
    const plain = new LookRenderer(W, H).render('surface', frame, toView, { scene: look });
    const cx = Math.floor(toView.ox + pose.x * toView.sx), cy = Math.floor(toView.oy - pose.y * toView.sy);
    const p = 4 * (cy * W + cx + 10);
    expect([plain.data[p], plain.data[p + 1], plain.data[p + 2], plain.data[p + 3]]).toEqual([0x20, 0xc0, 0x40, 255]);
  });
});
