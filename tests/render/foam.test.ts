// Foam and spray in the CPU look (exports, share page; the player paints the same dots, gpuLooks.ts): foam dots
// near-white over the liquid, spray droplets in the air, nothing where there is no diffuse particle. The colours are
// our own look (DIFFUSE_LOOK), checked against its constants. Also writes a splash frame to test-results/ to look at.
import { describe, it, expect } from 'vitest';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { PNG } from 'pngjs';
import { DIFFUSE_LOOK, LookRenderer, type ParticleFrame } from '../../src/lib/render/looks';
import { layoutView } from '../../src/lib/render/view';
import { bakeScene } from '../../src/lib/bake/bake';
import { clipLookOf } from '../../src/lib/clip/look';
import { ClipReader } from '../../src/lib/clip/decode';
import { parseScene } from '../../src/lib/scene';

const W = 400, H = 200;
const tank = { width: 1, height: 0.5 };
const { toView } = layoutView({ viewWidth: W, viewHeight: H, tankWidth: tank.width, tankHeight: tank.height });
const px = (x: number) => Math.floor(toView.ox + x * toView.sx);
const py = (y: number) => Math.floor(toView.oy - y * toView.sy);
const look = { liquids: [{ id: 'water', colour: '#3A8FB7' }], walls: [], wallStyle: 'outline' as const, props: [] };

function pool(diffuse?: ParticleFrame['diffuse']): ParticleFrame {
  const x: number[] = [], y: number[] = [], step = 0.005;
  for (let a = step / 2; a < 1; a += step) for (let b = step / 2; b < 0.2; b += step) { x.push(a); y.push(b); }
  return { count: x.length, x, y, speed: x.map(() => 0), maxSpeed: 0, diffuse };
}

function pixel(img: { data: Uint8Array; width: number }, x: number, y: number) {
  const p = 4 * (y * img.width + x);
  return [img.data[p], img.data[p + 1], img.data[p + 2], img.data[p + 3]];
}

describe('foam and spray in the CPU look', () => {
  const options = { restDensity: 1 / 0.005 ** 2, tank, scene: look };
  it('foam is drawn near-white on the surface, spray as a droplet in the air, nothing without them', () => {
    const diffuse = { count: 2, x: [0.3, 0.7], y: [0.195, 0.4], kind: [1, 0] };
    const plain = new LookRenderer(W, H).render('surface', pool(), toView, options);
    const plainFoam = pixel(plain, px(0.3), py(0.195)), plainAir = pixel(plain, px(0.7), py(0.4));
    expect(plainAir[3]).toBe(0);
    const img = new LookRenderer(W, H).render('surface', pool(diffuse), toView, options);
    const foam = pixel(img, px(0.3), py(0.195));
    // premultiplied "over": foam colour × alpha + what the liquid drew × (1 − alpha)
    const k = DIFFUSE_LOOK.FOAM_ALPHA;
    expect(plainFoam[3]).toBeGreaterThan(0); // the dot sits on the liquid
    for (let c = 0; c < 3; c++) expect(Math.abs(foam[c] - (DIFFUSE_LOOK.FOAM[c] * k + plainFoam[c] * (1 - k)))).toBeLessThanOrEqual(2);
    expect(Math.min(foam[0], foam[1], foam[2]) / (foam[3] / 255)).toBeGreaterThan(215); // reads near-white
    const spray = pixel(img, px(0.7), py(0.4));
    expect(spray[3]).toBe(Math.round(DIFFUSE_LOOK.SPRAY_ALPHA * 255));
    expect(Math.abs(spray[2] / (spray[3] / 255) - DIFFUSE_LOOK.SPRAY[2])).toBeLessThan(3);
  });

  it('a splash frame of a bake, drawn with its foam and spray (test-results/foam-splash-cpu.png)', async () => {
    const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
    doc.tank.cellSize = 1 / 64;
    doc.timing.endFrame = 1016;
    const parsed = parseScene(doc);
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    const baked = (await bakeScene(parsed.scene, 'shot'))!;
    const reader = await ClipReader.fromBytes(baked.clip);
    const frame = await reader.frameAt(1014);
    expect(frame.diffuse.count).toBeGreaterThan(0);
    const vw = 960, vh = 540;
    const view = layoutView({ viewWidth: vw, viewHeight: vh, tankWidth: 1, tankHeight: 1 }).toView;
    const scene = clipLookOf(parsed.scene);
    const withFoam = new LookRenderer(vw, vh).render('surface', frame, view, { tank: { width: 1, height: 1 }, scene });
    const foamless = new LookRenderer(vw, vh).render('surface', { ...frame, diffuse: undefined }, view, { tank: { width: 1, height: 1 }, scene });
    // the foam changes pixels (white ones) that the foamless frame draws otherwise
    let whiter = 0;
    for (let p = 0; p < vw * vh; p++) {
      const q = 4 * p;
      if (withFoam.data[q + 3] > 0 && withFoam.data[q] > 215 && withFoam.data[q] > foamless.data[q] + 30) whiter++;
    }
    expect(whiter).toBeGreaterThan(50);
    // over a dark slate background, to look at
    const png = new PNG({ width: vw, height: vh });
    const bg = [28, 36, 48];
    for (let p = 0; p < vw * vh; p++) {
      const q = 4 * p, a = withFoam.data[q + 3] / 255;
      for (let c = 0; c < 3; c++) png.data[q + c] = Math.round(withFoam.data[q + c] + bg[c] * (1 - a));
      png.data[q + 3] = 255;
    }
    mkdirSync('test-results', { recursive: true });
    writeFileSync('test-results/foam-splash-cpu.png', PNG.sync.write(png));
  }, 120_000);
});
