// Comp passes: the liquid matte measures the same liquid as the solver (independently: the matte from the particles
// splatted in view pixels, the solver from its grid density), and the passes ZIP holds the named PNGs at plate size,
// read back with pngjs (a PNG decoder independent of fast-png, which writes them).
import { describe, it, expect } from 'vitest';
import { unzipSync } from 'fflate';
import { PNG } from 'pngjs';
import { createSolver, type FrameStats } from '../../src/lib/sim/solver';
import { LookRenderer, type ParticleFrame } from '../../src/lib/render/looks';
import { layoutView } from '../../src/lib/render/view';
import { lookOptionsFromStats } from '../../src/lib/export/source';
import { encodeMattePng, encodeRgbaPng, liquidCoverage, matteRgba, passEntryName, passesReadme, straightRgba, zipPasses, PASSES } from '../../src/lib/export/passes';
import type { ExportLabels } from '../../src/lib/export/layout';
import { sceneFrom } from '../sim/helpers/scenes';

const plate = { width: 640, height: 360 };
const metresPerPixel = 1 / 300; // the 2 m × 1 m tank spans 600 × 300 plate pixels

function damBreak() {
  return sceneFrom({
    version: 1, tank: { width: 2, height: 1, cellSize: 1 / 40 },
    timing: { fps: 24, startFrame: 1001, endFrame: 1030, substeps: 2 }, physics: { seed: 7 },
    pours: [{ id: 'column', shape: { type: 'rect', x: 0, y: 0, width: 0.6, height: 0.6 } }],
  });
}

function frameOf(sim: ReturnType<typeof createSolver>): ParticleFrame {
  const n = sim.count;
  return { count: n, x: sim.x.slice(0, n), y: sim.y.slice(0, n), speed: new Float32Array(n), maxSpeed: 1, liquid: sim.liquid.slice(0, n) };
}

const labels: ExportLabels = {
  studioName: 'Gullwing Previs', showName: 'Salt Marsh', shotCode: 'SM_010', versionNumber: 3, artistName: 'R. Ventner',
  date: '2026-12-03', reviewState: 'In review', rateId: '24', cutIn: 1001, sourceTimecodeIn: '01:00:00:00',
};

describe('liquid matte pass', () => {
  it('counts, in pixels × (metres per pixel)², the solver’s liquid area of the frame within 3 %', () => {
    const sim = createSolver(damBreak());
    const stats: FrameStats[] = [sim.stats()];
    const frames: ParticleFrame[] = [frameOf(sim)];
    for (let f = 0; f < 12; f++) {
      stats.push(sim.stepFrame());
      frames.push(frameOf(sim));
    }
    // The export's look options: rest density from the bake stats (the first measured frame), as source.ts does.
    const options = { ...lookOptionsFromStats({ frames: stats }), tank: { width: 2, height: 1 } };
    const layout = layoutView({ viewWidth: plate.width, viewHeight: plate.height, tankWidth: 2, tankHeight: 1, plate, metresPerPixel });
    const looks = new LookRenderer(plate.width, plate.height);
    for (const k of [6, 12]) {
      const cover = liquidCoverage(looks.densityField(frames[k], layout.toView, options), plate.width, plate.height);
      let sum = 0;
      for (const c of cover) sum += c / 255;
      const matteArea = sum * metresPerPixel * metresPerPixel;
      // the two measure the same ½ρ₀ contour (area.ts); 3 % is the acceptance bound
      expect(Math.abs(matteArea - stats[k].liquidArea) / stats[k].liquidArea).toBeLessThan(0.03);
    }
  });

  it('is black with no liquid and white inside a resting block', () => {
    const sim = createSolver(damBreak());
    const options = { ...lookOptionsFromStats({ frames: [sim.stats()] }), tank: { width: 2, height: 1 } };
    const layout = layoutView({ viewWidth: plate.width, viewHeight: plate.height, tankWidth: 2, tankHeight: 1, plate, metresPerPixel });
    const cover = liquidCoverage(new LookRenderer(plate.width, plate.height).densityField(frameOf(sim), layout.toView, options), plate.width, plate.height);
    // the column is x 0–0.6 m, y 0–0.6 m: plate pixel (90, 270) is inside (0.3 m, 0.3 m), (450, 100) is clear air
    const px = (x: number, y: number) => cover[Math.round(layout.toView.oy - y * layout.toView.sy) * plate.width + Math.round(layout.toView.ox + x * layout.toView.sx)];
    expect(px(0.3, 0.3)).toBe(255);
    expect(px(1.5, 0.8)).toBe(0);
  });
});

describe('passes ZIP', () => {
  it('unzips to the README and one rgba and one matte PNG per frame, at plate size, with the pixels written', () => {
    const sim = createSolver(damBreak());
    const statsFirst = sim.stats();
    const options = { ...lookOptionsFromStats({ frames: [statsFirst] }), tank: { width: 2, height: 1 } };
    const layout = layoutView({ viewWidth: plate.width, viewHeight: plate.height, tankWidth: 2, tankHeight: 1, plate, metresPerPixel });
    const looks = new LookRenderer(plate.width, plate.height);
    const files: { name: string; png: Uint8Array }[] = [];
    const expected = new Map<string, Uint8Array>();
    for (const f of [1001, 1002]) {
      if (f > 1001) sim.stepFrame();
      const frame = frameOf(sim);
      const coverage = liquidCoverage(looks.densityField(frame, layout.toView, options), plate.width, plate.height);
      const rgba = straightRgba(looks.render('surface', frame, layout.toView, options));
      files.push({ name: passEntryName(labels, 'rgba', f), png: encodeRgbaPng(plate.width, plate.height, rgba) });
      expected.set(passEntryName(labels, 'rgba', f), rgba);
      // the matte is a grey PNG: pngjs gives it back as opaque RGBA with grey = coverage
      files.push({ name: passEntryName(labels, 'matte', f), png: encodeMattePng(plate.width, plate.height, coverage) });
      expected.set(passEntryName(labels, 'matte', f), matteRgba(coverage));
    }
    const zip = zipPasses(passesReadme(labels, 1001, 1002, plate.width, plate.height), files);
    const out = unzipSync(zip);
    expect(Object.keys(out).sort()).toEqual(
      ['README.txt', 'matte/SM_010_v003.1001.png', 'matte/SM_010_v003.1002.png', 'rgba/SM_010_v003.1001.png', 'rgba/SM_010_v003.1002.png'],
    );
    const readme = new TextDecoder().decode(out['README.txt']);
    for (const pass of Object.keys(PASSES)) expect(readme).toContain(`${pass}/`);
    for (const [name, px] of expected) {
      const png = PNG.sync.read(Buffer.from(out[name]));
      expect([png.width, png.height]).toEqual([plate.width, plate.height]);
      expect(Buffer.compare(png.data, Buffer.from(px))).toBe(0);
    }
    // the rgba pass is transparent in clear air and opaque-ish over the liquid; the matte is opaque everywhere
    const rgba = PNG.sync.read(Buffer.from(out['rgba/SM_010_v003.1001.png']));
    const at = (x: number, y: number) => 4 * (Math.round(layout.toView.oy - y * layout.toView.sy) * plate.width + Math.round(layout.toView.ox + x * layout.toView.sx)) + 3;
    expect(rgba.data[at(1.5, 0.8)]).toBe(0);
    expect(rgba.data[at(0.3, 0.3)]).toBeGreaterThan(128);
  });
});
