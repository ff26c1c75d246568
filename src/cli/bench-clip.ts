// Clip benchmark: bakes the reference dam break, encodes every frame, and prints bytes per particle per frame,
// the worst position error (as a fraction of the tank size), encode and decode speed, and random-seek time.
// A second clip of the same frames marks each particle with one of two liquids (the left and right halves of the
// column at the start; the mark follows the particle's id) and carries one prop pose a frame: the size of the
// version 2 additions where they are not free. A third clip adds the bake's foam and spray section (the solver's
// diffuse particles, sim/diffuse.ts): its extra bytes are counted per diffuse particle per frame, apart from the liquid.
import { createSolver } from '../lib/sim/solver';
import { referenceDamBreak } from '../lib/sim/reference';
import { ClipWriter } from '../lib/clip/encode';
import { ClipReader, decodeFrame } from '../lib/clip/decode';
import { positionErrorBound } from '../lib/clip/format';
import { PLAIN_LOOK } from '../lib/clip/encode';

const setup = referenceDamBreak(1);
const scene = setup.scene;
const sim = createSolver(scene, setup.options);
const { startFrame, endFrame, fps } = scene.timing;
const writer = new ClipWriter({
  startFrame,
  endFrame,
  fps,
  tankWidth: scene.tank.width,
  tankHeight: scene.tank.height,
  particleCapacity: sim.capacity,
  solverBuild: 'bench',
  sceneHash: 'bench',
});
const twoLiquids = new ClipWriter({
  ...writer.header,
  solverBuild: 'bench',
  sceneHash: 'bench',
  look: {
    ...PLAIN_LOOK,
    liquids: [{ id: 'left', colour: '#3A8FB7' }, { id: 'right', colour: '#C8341E' }],
    props: [{ id: 'box', shape: { type: 'rect', x: 0.4, y: 0.4, width: 0.1, height: 0.1 }, centroid: [0.45, 0.45], colour: '#E3A83C' }],
  },
});
const withFoam = new ClipWriter({ ...writer.header, solverBuild: 'bench', sceneHash: 'bench', diffuse: true });
let diffuseFrames = 0;
const liquidOfId = new Map<number, number>();
let liquidScratch = new Uint8Array(0);

// Keep a few frames to measure the real error against.
const checkFrames = new Map<number, { x: Float32Array; y: Float32Array }>();
let particleFrames = 0;
let encodeMs = 0;
for (let f = startFrame; f <= endFrame; f++) {
  if (f > startFrame) sim.stepFrame();
  if ((f - startFrame) % 60 === 30) checkFrames.set(f, { x: sim.x.slice(0, sim.count), y: sim.y.slice(0, sim.count) });
  const t = performance.now();
  writer.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v);
  encodeMs += performance.now() - t;
  particleFrames += sim.count;
  withFoam.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v, { diffuse: sim.diffuse });
  diffuseFrames += sim.diffuse.count;
  if (f === startFrame) {
    let mid = 0;
    for (let i = 0; i < sim.count; i++) mid = Math.max(mid, sim.x[i]);
    for (let i = 0; i < sim.count; i++) liquidOfId.set(sim.ids[i], sim.x[i] < mid / 2 ? 0 : 1);
  }
  if (liquidScratch.length < sim.count) liquidScratch = new Uint8Array(sim.capacity);
  for (let i = 0; i < sim.count; i++) liquidScratch[i] = liquidOfId.get(sim.ids[i]) ?? 0;
  const k = f - startFrame;
  twoLiquids.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v, { liquid: liquidScratch, props: [{ x: 0.45 + 0.001 * k, y: 0.45, angle: 3 * k }] });
}
const twoLiquidBytes = twoLiquids.finish();
const foamBytes = withFoam.finish();
let t = performance.now();
const bytes = writer.finish();
encodeMs += performance.now() - t;
const frames = endFrame - startFrame + 1;

const reader = await ClipReader.fromBytes(bytes, 1000);
const tank = Math.max(scene.tank.width, scene.tank.height);
// Worst error: nearest source particle (Chebyshev) of each decoded particle, over the checked frames.
let worst = 0;
for (const [f, src] of checkFrames) {
  const got = await reader.frameAt(f);
  const cell = reader.header.binSize;
  const grid = new Map<number, number[]>();
  for (let i = 0; i < src.x.length; i++) {
    const k = Math.floor(src.y[i] / cell) * 100000 + Math.floor(src.x[i] / cell);
    (grid.get(k) ?? grid.set(k, []).get(k)!).push(i);
  }
  for (let j = 0; j < got.count; j++) {
    let best = Infinity;
    for (const i of grid.get(Math.floor(got.y[j] / cell) * 100000 + Math.floor(got.x[j] / cell)) ?? [])
      best = Math.min(best, Math.max(Math.abs(src.x[i] - got.x[j]), Math.abs(src.y[i] - got.y[j])));
    worst = Math.max(worst, best);
  }
}

// Decode speed: every frame from inflated chunks (inflate counted separately).
const inflated: Uint8Array[] = [];
t = performance.now();
for (let k = 0; k < reader.index.length; k++) inflated.push(await reader.loadChunk(k));
const inflateMs = performance.now() - t;
t = performance.now();
for (let f = startFrame; f <= endFrame; f++) {
  const k = reader.chunkOf(f);
  decodeFrame(reader.header, inflated[k], f - reader.index[k].firstFrame, f);
}
const decodeMs = performance.now() - t;

// Random seek: a cold reader (no cache) decoding one random frame: inflate its chunk + decode the frame.
let seed = 12345;
const rand = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
const seeks: number[] = [];
for (let i = 0; i < 40; i++) {
  const cold = await ClipReader.fromBytes(bytes, 1);
  const f = startFrame + Math.floor(rand() * frames);
  t = performance.now();
  await cold.frameAt(f);
  seeks.push(performance.now() - t);
}
seeks.sort((a, b) => a - b);

const figures = {
  bench: 'clip',
  scene: 'reference dam break',
  particles: sim.capacity,
  frames,
  bytes: bytes.length,
  format_version: reader.header.formatVersion,
  bytes_per_particle_frame: +(bytes.length / particleFrames).toFixed(3),
  two_liquids_and_a_prop_bytes_per_particle_frame: +(twoLiquidBytes.length / particleFrames).toFixed(3),
  diffuse_particle_frames: diffuseFrames,
  foam_section_bytes: foamBytes.length - bytes.length,
  foam_bytes_per_diffuse_particle_frame: diffuseFrames > 0 ? +((foamBytes.length - bytes.length) / diffuseFrames).toFixed(3) : 0,
  max_error_fraction_of_tank: +(worst / tank).toExponential(3),
  error_bound_fraction_of_tank: +(positionErrorBound(reader.header) / tank).toExponential(3),
  encode_ms_per_frame: +(encodeMs / frames).toFixed(3),
  inflate_ms_per_frame: +(inflateMs / frames).toFixed(3),
  decode_ms_per_frame: +(decodeMs / frames).toFixed(3),
  random_seek_ms_median: +seeks[Math.floor(seeks.length / 2)].toFixed(3),
  random_seek_ms_p90: +seeks[Math.floor(seeks.length * 0.9)].toFixed(3),
};
console.log(`clip: ${figures.bytes_per_particle_frame} bytes/particle/frame (target ≤ 2.5; ${figures.two_liquids_and_a_prop_bytes_per_particle_frame} with two liquids side by side and a prop), worst error ${figures.max_error_fraction_of_tank} of the tank (target ≤ ${(1 / 4000).toExponential(2)})`);
console.log(`clip: foam and spray ${figures.foam_bytes_per_diffuse_particle_frame} bytes/diffuse particle/frame (${figures.diffuse_particle_frames} diffuse particle-frames, ${figures.foam_section_bytes} bytes, apart from the liquid's figure above)`);
console.log(`clip: encode ${figures.encode_ms_per_frame} ms/frame, inflate ${figures.inflate_ms_per_frame} + decode ${figures.decode_ms_per_frame} ms/frame, random seek median ${figures.random_seek_ms_median} ms (p90 ${figures.random_seek_ms_p90})`);
console.log(JSON.stringify(figures));
