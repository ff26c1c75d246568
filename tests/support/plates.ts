// Test support: a PNG plate uploaded the way the app does it (start → PUT to the presigned URL → complete).
import { expect } from 'vitest';
import type { TestStudio } from './app';

/** Uploads the PNG as the shot's plate through the API as the studio's artist; returns the plate asset's id. */
export async function uploadPngPlate(studio: TestStudio, shotId: number, png: Uint8Array, fileName = 'plate.png'): Promise<number> {
  const artist = studio.members.artist.client;
  const start = await artist.post(`/api/studios/${studio.id}/shots/${shotId}/plates`, { fileName, contentType: 'image/png', byteSize: png.length });
  expect(start.status, JSON.stringify(start.body)).toBe(201);
  const put = await fetch(start.body.upload.url, { method: 'PUT', body: Buffer.from(png), headers: start.body.upload.headers });
  expect(put.status).toBe(200);
  const done = await artist.post(`/api/studios/${studio.id}/plates/${start.body.assetId}/complete`, {});
  expect(done.status, JSON.stringify(done.body)).toBe(200);
  return Number(start.body.assetId);
}
