// Test support: a version saved and baked for real through the API (the test app's bake worker process does the work).
import { expect } from 'vitest';
import type { Client } from './app';
import { tinyScene } from './scenes';

/** Saves a small scene as a new version of the shot, bakes it and waits until it is baked; returns its id. */
export async function bakedVersion(artist: Client, shotId: number, seed: number): Promise<number> {
  const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: tinyScene(12, seed), comment: `pass ${seed}` });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  const id: number = saved.body.version.id;
  await bakeAndWait(artist, id, 120_000, 200);
  return id;
}

/** Starts the version's bake and waits until it is baked; throws with the bake's answer if it fails or times out. */
export async function bakeAndWait(artist: Client, versionId: number, timeoutMs: number, pollMs = 1000): Promise<void> {
  const started = await artist.post(`/api/versions/${versionId}/bake`, {});
  expect([200, 202], JSON.stringify(started.body)).toContain(started.status);
  const until = Date.now() + timeoutMs;
  for (;;) {
    const res = await artist.get(`/api/versions/${versionId}/bake`);
    if (res.body.bakeState === 'baked') return;
    if (res.body.bakeState === 'failed' || Date.now() > until) throw new Error(`bake not baked: ${JSON.stringify(res.body)}`);
    await new Promise((r) => setTimeout(r, pollMs));
  }
}
