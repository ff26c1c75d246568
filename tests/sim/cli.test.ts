// The headless CLI contract: one JSON line per frame, the first the initial state; bad scene → non-zero exit.
import { describe, it, expect } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const root = new URL('../..', import.meta.url).pathname;
const run = (args: string[]) => spawnSync('npx', ['tsx', 'src/cli/sim.ts', ...args], { cwd: root, encoding: 'utf8' });

describe('sim CLI', () => {
  it('writes the initial state and then one line per frame', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-sim-'));
    const out = join(dir, 'frames.jsonl');
    const r = run(['--scene', 'tests/fixtures/scenes/small-drop.json', '--out', out, '--frames', '3']);
    expect(r.status).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    expect(lines.map((l) => l.frame)).toEqual([1001, 1002, 1003]);
    expect(lines[0].time).toBe(0);
    expect(lines[1].time).toBeCloseTo(1 / 24, 12);
    for (const l of lines) {
      expect(l.count).toBeGreaterThan(0);
      for (const k of ['x', 'y', 'u', 'v', 'liquid']) expect(l[k]).toHaveLength(l.count);
      expect(l.liquid.every((i: number) => i === 0)).toBe(true); // a version 1 scene: all water
      expect(Array.isArray(l.props)).toBe(true);
    }
    expect(lines[0].v.every((v: number) => v === 0)).toBe(true);
    expect(lines[2].v.some((v: number) => v < 0)).toBe(true); // falling
  });

  it('bakes many frames without piling up stream listeners (no MaxListenersExceededWarning)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-sim-'));
    const scene = join(dir, 'long.json');
    writeFileSync(scene, JSON.stringify({ version: 1, tank: { width: 0.5, height: 0.25, cellSize: 0.05 }, timing: { fps: 24, startFrame: 1, endFrame: 30 },
      pours: [{ id: 'p', shape: { type: 'rect', x: 0, y: 0, width: 0.5, height: 0.1 } }] }));
    const r = run(['--scene', scene, '--out', join(dir, 'frames.jsonl')]);
    expect(r.status).toBe(0);
    expect(readFileSync(join(dir, 'frames.jsonl'), 'utf8').trim().split('\n')).toHaveLength(30);
    expect(r.stderr).not.toMatch(/MaxListenersExceededWarning/);
  });

  it('rejects a bad scene with a non-zero exit and one line naming the field', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-sim-'));
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ version: 1, tank: { width: 1, height: 1, cellSize: 0.05 }, physics: { flipRatio: 2 } }));
    const r = run(['--scene', bad, '--out', join(dir, 'o.jsonl')]);
    expect(r.status).not.toBe(0);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/physics\.flipRatio/);
  });
});
