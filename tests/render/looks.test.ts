// Pixel tests of the CPU look (what exports and the share page draw): props at their pose inside their outline,
// walls in the scene's style, each liquid in its own colour, darker with depth.
import { describe, it, expect } from 'vitest';
import { LookRenderer, type ParticleFrame } from '../../src/lib/render/looks';
import { layoutView } from '../../src/lib/render/view';
import type { ClipLook, PropPose } from '../../src/lib/clip/format';
import { pointInPolygon } from '../../src/lib/scene/shapes';

const W = 400, H = 200;
const tank = { width: 1, height: 0.5 };
const { toView } = layoutView({ viewWidth: W, viewHeight: H, tankWidth: tank.width, tankHeight: tank.height });
const px = (x: number) => toView.ox + x * toView.sx;
const py = (y: number) => toView.oy - y * toView.sy;

/** Particles on a square lattice of `step` m filling [x0, x1] × [0, depth], of liquid `liquidOf(x)`. */
function block(parts: { x0: number; x1: number; depth: number; liquid: number }[], step = 0.005): ParticleFrame {
  const x: number[] = [], y: number[] = [], liquid: number[] = [];
  for (const p of parts) {
    for (let a = p.x0 + step / 2; a < p.x1; a += step) for (let b = step / 2; b < p.depth; b += step) { x.push(a); y.push(b); liquid.push(p.liquid); }
  }
  return { count: x.length, x, y, speed: x.map(() => 0), maxSpeed: 0, liquid };
}

const RED = '#C8341E', BLUE = '#3A8FB7', CAN = '#20C040';
const rest = 1 / 0.005 ** 2; // particles per m² of the lattice

function look(over: Partial<ClipLook> = {}): ClipLook {
  return {
    liquids: [{ id: 'water', colour: BLUE }, { id: 'paint', colour: RED }],
    walls: [], wallStyle: 'outline', props: [],
    ...over,
  };
}

function pixel(img: { data: Uint8Array; width: number }, x: number, y: number) {
  const p = 4 * (Math.floor(y) * img.width + Math.floor(x));
  return [img.data[p], img.data[p + 1], img.data[p + 2], img.data[p + 3]];
}

describe('props and walls in the CPU look', () => {
  // A 0.2 × 0.1 m rectangle drawn at centroid (0.3, 0.35), shown at centroid (0.6, 0.25) turned 30° counter-clockwise.
  const prop = { id: 'can', shape: { type: 'rect' as const, x: 0.2, y: 0.3, width: 0.2, height: 0.1 }, centroid: [0.3, 0.35] as [number, number], colour: CAN };
  const pose: PropPose = { x: 0.6, y: 0.25, angle: 30 };
  const corners = [[-0.1, -0.05], [0.1, -0.05], [0.1, 0.05], [-0.1, 0.05]].map(([dx, dy]) => {
    const a = (30 * Math.PI) / 180;
    return [px(0.6 + Math.cos(a) * dx - Math.sin(a) * dy), py(0.25 + Math.sin(a) * dx + Math.cos(a) * dy)] as [number, number];
  });
  const empty: ParticleFrame = { count: 0, x: [], y: [], speed: [], maxSpeed: 0, props: [pose] };

  it('fills a prop at its pose, inside its outline only', () => {
    const img = new LookRenderer(W, H).render('surface', empty, toView, { scene: look({ props: [prop] }) });
    let inside = 0, outsideDrawn = 0, interiorWrong = 0;
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const [r, g, b, a] = pixel(img, x, y);
        const isIn = pointInPolygon(corners, x + 0.5, y + 0.5);
        // Distance to the outline, px (to allow the 1.5 px rim around the edge).
        let d = Infinity;
        for (let k = 0; k < 4; k++) {
          const [ax, ay] = corners[k], [bx, by] = corners[(k + 1) % 4];
          const ex = bx - ax, ey = by - ay;
          const u = Math.max(0, Math.min(1, ((x + 0.5 - ax) * ex + (y + 0.5 - ay) * ey) / (ex * ex + ey * ey)));
          d = Math.min(d, Math.hypot(x + 0.5 - ax - u * ex, y + 0.5 - ay - u * ey));
        }
        if (isIn) inside++;
        if (!isIn && d > 0.75 && a > 0) outsideDrawn++;
        if (isIn && d > 1.5 && !(r === 0x20 && g === 0xc0 && b === 0x40 && a === 255)) interiorWrong++;
      }
    }
    // The turned rectangle covers 0.02 m² = 0.02 × 400² px² = 3200 px.
    expect(inside).toBeGreaterThan(3100);
    expect(inside).toBeLessThan(3300);
    expect(outsideDrawn).toBe(0);
    expect(interiorWrong).toBe(0);
    // The drawn pose (unturned, at x 0.2–0.4) is empty: the prop is where the frame says, not where it was drawn.
    expect(pixel(img, px(0.25), py(0.35))[3]).toBe(0);
  });

  it('draws no prop without a pose (a version 1 clip)', () => {
    const img = new LookRenderer(W, H).render('surface', { ...empty, props: undefined }, toView, { scene: look({ props: [prop] }) });
    expect(img.data.every((v) => v === 0)).toBe(true);
  });

  it('draws walls as an outline, filled, or not at all', () => {
    const walls = [{ id: 'step', shape: { type: 'rect' as const, x: 0.1, y: 0, width: 0.2, height: 0.2 } }];
    const frame: ParticleFrame = { count: 0, x: [], y: [], speed: [], maxSpeed: 0 };
    const centre = (style: ClipLook['wallStyle']) => pixel(new LookRenderer(W, H).render('surface', frame, toView, { scene: look({ walls, wallStyle: style }) }), px(0.2), py(0.1));
    const edge = (style: ClipLook['wallStyle']) => pixel(new LookRenderer(W, H).render('surface', frame, toView, { scene: look({ walls, wallStyle: style }) }), px(0.1), py(0.1));
    expect(centre('outline')[3]).toBe(0);
    expect(edge('outline')[3]).toBeGreaterThan(200);
    expect(centre('fill')[3]).toBeGreaterThan(200);
    expect(edge('hidden')[3]).toBe(0);
    expect(centre('hidden')[3]).toBe(0);
  });
});

describe('liquids in their own colour', () => {
  // Water on the left half, paint on the right, both 0.4 m deep.
  const frame = block([{ x0: 0, x1: 0.5, depth: 0.4, liquid: 0 }, { x0: 0.5, x1: 1, depth: 0.4, liquid: 1 }]);
  const img = new LookRenderer(W, H).render('surface', frame, toView, { scene: look(), restDensity: rest, tank });

  it('keeps two liquids side by side in their colours', () => {
    const water = pixel(img, px(0.25), py(0.2));
    const paint = pixel(img, px(0.75), py(0.2));
    expect(water[3]).toBeGreaterThan(150);
    expect(paint[3]).toBeGreaterThan(150);
    // Blue over red in the water, red over blue in the paint (premultiplied, both darkened with depth alike).
    expect(water[2]).toBeGreaterThan(water[0] * 2);
    expect(paint[0]).toBeGreaterThan(paint[2] * 3);
    // Straight colour ratios close to the liquids' own (#3A8FB7: b/g = 1.28; #C8341E: r/g = 3.8).
    expect(water[2] / water[1]).toBeCloseTo(0xb7 / 0x8f, 0);
    expect(paint[0] / paint[1]).toBeGreaterThan(2.5);
  });

  it('shades deeper liquid darker and draws a lit edge at the surface', () => {
    // Luma of the straight (un-premultiplied) colour, Rec. 709 weights.
    const luma = (p: number[]) => (p[3] === 0 ? 0 : (0.2126 * p[0] + 0.7152 * p[1] + 0.0722 * p[2]) / (p[3] / 255));
    const shallow = pixel(img, px(0.25), py(0.36));
    const deep = pixel(img, px(0.25), py(0.04));
    expect(luma(deep)).toBeLessThan(luma(shallow) * 0.8);
    // The edge line along the surface (y = 0.4 m) is lighter than the fill just under it.
    let brightest = 0;
    for (let y = py(0.4) - 3; y <= py(0.4) + 3; y++) brightest = Math.max(brightest, luma(pixel(img, px(0.25), y)));
    expect(brightest).toBeGreaterThan(luma(shallow) * 1.5);
  });

  it('shades liquid under an air pocket as deep as the liquid beside it (no pale column under a cavity)', () => {
    // A 0.4 m pool with a cavity 0.04 m wide and 0.2 m deep cut from its surface (where a plunging can would be).
    const pool = block([{ x0: 0, x1: 0.48, depth: 0.4, liquid: 0 }, { x0: 0.52, x1: 1, depth: 0.4, liquid: 0 }]);
    const floor = block([{ x0: 0.48, x1: 0.52, depth: 0.2, liquid: 0 }]);
    const frame: ParticleFrame = {
      count: pool.count + floor.count, x: [...Array.from(pool.x), ...Array.from(floor.x)], y: [...Array.from(pool.y), ...Array.from(floor.y)],
      speed: new Array(pool.count + floor.count).fill(0), maxSpeed: 0, liquid: new Array(pool.count + floor.count).fill(0),
    };
    const img = new LookRenderer(W, H).render('surface', frame, toView, { scene: look({ liquids: [look().liquids[0]] }), restDensity: rest, tank });
    const under = pixel(img, px(0.5), py(0.05));
    const beside = pixel(img, px(0.3), py(0.05));
    for (let c = 0; c < 4; c++) expect(Math.abs(under[c] - beside[c])).toBeLessThanOrEqual(3);
  });

  it('draws one liquid in its colour without a scene look in the default water colour', () => {
    const one = block([{ x0: 0, x1: 1, depth: 0.3, liquid: 0 }]);
    const red = new LookRenderer(W, H).render('surface', one, toView, { scene: look({ liquids: [{ id: 'paint', colour: RED }] }), restDensity: rest, tank });
    const plain = new LookRenderer(W, H).render('surface', one, toView, { restDensity: rest, tank });
    const a = pixel(red, px(0.5), py(0.15)), b = pixel(plain, px(0.5), py(0.15));
    expect(a[0]).toBeGreaterThan(a[2] * 3);
    expect(b[2]).toBeGreaterThan(b[0] * 2);
  });
});
