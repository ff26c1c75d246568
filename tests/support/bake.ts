// Test support: a version saved and baked for real through the API (the test app's bake worker process does the work).
import { expect } from 'vitest';
import type { Client } from './app';
import { tinyScene } from './scenes';

/** Saves a small scene as a new version of the shot, bakes it and waits until it is baked; returns its id. */
export async function bakedVersion(artist: Client, shotId: number, seed: number): Promise<number> {
  const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: tinyScene(12, seed), comment: `pass ${seed}` });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  const id: number = saved.body.version.id;
  await artist.post(`/api/versions/${id}/bake`);
  for (let i = 0; i < 600; i++) {
    const res = await artist.get(`/api/versions/${id}/bake`);
    if (res.body.bakeState === 'baked') return id;
    if (res.body.bakeState === 'failed') throw new Error('bake failed');
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('bake did not finish');
}
