// Test support: a PNG plate uploaded the way the app does it (start → POST the presigned form → complete).
import { expect } from 'vitest';
import type { TestStudio } from './app';

/** Sends the bytes with the presigned form the upload start answered with (fields first, the file last). */
export async function postUploadForm(upload: { url: string; fields: Record<string, string> }, bytes: Uint8Array, contentType: string): Promise<Response> {
  const form = new FormData();
  for (const [k, v] of Object.entries(upload.fields)) form.append(k, v);
  form.append('file', new Blob([Buffer.from(bytes)], { type: contentType }), 'upload');
  return fetch(upload.url, { method: 'POST', body: form });
}

/** Uploads the PNG as the shot's plate through the API as the studio's artist; returns the plate asset's id. */
export async function uploadPngPlate(studio: TestStudio, shotId: number, png: Uint8Array, fileName = 'plate.png'): Promise<number> {
  const artist = studio.members.artist.client;
  const start = await artist.post(`/api/studios/${studio.id}/shots/${shotId}/plates`, { fileName, contentType: 'image/png', byteSize: png.length });
  expect(start.status, JSON.stringify(start.body)).toBe(201);
  const sent = await postUploadForm(start.body.upload, png, 'image/png');
  expect(sent.status, await sent.clone().text()).toBeLessThan(300);
  const done = await artist.post(`/api/studios/${studio.id}/plates/${start.body.assetId}/complete`, {});
  expect(done.status, JSON.stringify(done.body)).toBe(200);
  return Number(start.body.assetId);
}
