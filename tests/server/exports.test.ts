// Stored exports through the API: a presigned POST form from the "browser" (the store refuses a larger file or another
// key), completion checks size and magic bytes, the list shows who, when, format, size and a download link with the
// file name; bad input is refused naming the field.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { makeStudio, type TestStudio } from '../support/app';
import { makeVersion } from './endpoints';
import { postUploadForm } from '../support/plates';
import { closeDb, db } from '../../src/lib/server/db';
import { assets } from '../../src/lib/server/db/schema';
import { headObject } from '../../src/lib/server/storage';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const GIF = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 2, 0, 2, 0, 0, 0, 0, 0x2c, 0, 0x3b]);
const options = { first: 1001, last: 1010, width: 320, height: 180, look: 'surface', slate: true, burnIns: true, plate: false, loop: true };

async function exportCount(versionId: number) {
  return (await db().select().from(assets).where(eq(assets.versionId, versionId))).filter((a) => a.kind === 'export').length;
}

describe('stored exports', () => {
  it('start → POST form → complete → listed with author, size and a named download link', async () => {
    const artist = studio.members.artist;
    const { versionId } = await makeVersion(studio, { baked: true });
    const start = await artist.client.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: GIF.length, fileName: 'LT_010_v001_1001-1010.gif', options });
    expect(start.status, JSON.stringify(start.body)).toBe(201);
    const early = await artist.client.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(early.status).toBe(409);
    expect(start.body.upload).toMatchObject({ method: 'POST', fields: { 'Content-Type': 'image/gif' }, maxBytes: GIF.length });
    // The form's policy binds the key, the type and the size declared (S3 POST policy conditions, sigv4-HTTPPOSTConstructPolicy).
    const policy = JSON.parse(Buffer.from(start.body.upload.fields.Policy, 'base64').toString('utf8'));
    expect(policy.conditions).toContainEqual(['content-length-range', 1, GIF.length]);
    expect(policy.conditions).toContainEqual(['eq', '$Content-Type', 'image/gif']);
    expect(policy.conditions).toContainEqual({ key: start.body.upload.fields.key });
    const sent = await postUploadForm(start.body.upload, GIF, 'image/gif');
    expect(sent.status, await sent.clone().text()).toBe(204);
    const done = await artist.client.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.export).toMatchObject({ format: 'gif', byteSize: GIF.length, width: 320, height: 180, fileName: 'LT_010_v001_1001-1010.gif', createdBy: artist.name });

    const list = await studio.members.supervisor.client.get(`/api/versions/${versionId}/exports`);
    expect(list.status).toBe(200);
    expect(list.body.exports).toHaveLength(1);
    const item = list.body.exports[0];
    expect(new Date(item.createdAt).getTime()).toBeGreaterThan(Date.now() - 60_000);
    const dl = await fetch(item.downloadUrl);
    expect(dl.status).toBe(200);
    expect(dl.headers.get('content-disposition')).toContain('LT_010_v001_1001-1010.gif');
    expect(new Uint8Array(await dl.arrayBuffer())).toEqual(GIF);

    const again = await artist.client.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(again.status).toBe(409);
    // The form used again after completion writes under uploads/ only: the listed export is the checked copy.
    expect(start.body.upload.fields.key.startsWith(`uploads/${studio.id}/`)).toBe(true);
    expect((await postUploadForm(start.body.upload, new Uint8Array(GIF.length).fill(0x41), 'image/gif')).status).toBe(204);
    expect(new Uint8Array(await (await fetch(item.downloadUrl)).arrayBuffer())).toEqual(GIF);
    const one = await artist.client.get(`/api/exports/${start.body.assetId}`);
    expect(one.body.export.id).toBe(start.body.assetId);
  });

  it('refuses a file whose bytes are not the declared format (422) and removes it', async () => {
    const artist = studio.members.artist.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const fake = new TextEncoder().encode('<html>not a movie</html>');
    const start = await artist.post(`/api/versions/${versionId}/exports`, { format: 'mp4', byteSize: fake.length, fileName: 'x.mp4', options });
    expect((await postUploadForm(start.body.upload, fake, 'video/mp4')).status).toBe(204);
    const done = await artist.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(done.status).toBe(422);
    expect(done.body.error.fields).toHaveProperty('file');
    expect(await exportCount(versionId)).toBe(0);
  });

  it('refuses a size that differs from the declared one (422)', async () => {
    const artist = studio.members.artist.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const start = await artist.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: GIF.length + 5, fileName: 'x.gif', options });
    expect((await postUploadForm(start.body.upload, GIF, 'image/gif')).status).toBe(204); // smaller than declared: within the form's range
    const done = await artist.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(done.status).toBe(422);
    expect(done.body.error.fields).toHaveProperty('byteSize');
  });

  it('the store refuses a file larger than declared and the form sent to another key; completion then finds nothing', async () => {
    const artist = studio.members.artist.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const start = await artist.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: GIF.length, fileName: 'LT_010_v001_big.gif', options });
    expect(start.status, JSON.stringify(start.body)).toBe(201);
    const bigger = new Uint8Array([...GIF, 0]);
    // content-length-range 1…declared (S3 POST policy) → 400 EntityTooLarge (S3 error responses: from memory)
    const over = await postUploadForm(start.body.upload, bigger, 'image/gif');
    expect(over.status).toBe(400);
    expect(await over.text()).toContain('<Code>EntityTooLarge</Code>');
    const otherKey = `${start.body.upload.fields.key.replace(/[^/]+$/, '')}chosen-by-client.gif`;
    const moved = await postUploadForm({ url: start.body.upload.url, fields: { ...start.body.upload.fields, key: otherKey } }, GIF, 'image/gif');
    expect(moved.status).toBe(403); // the key condition fails (S3 POST policy exact match)
    expect(await headObject(otherKey)).toBeNull();
    expect(await headObject(start.body.upload.fields.key)).toBeNull();
    const done = await artist.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(done.status).toBe(409);
  });

  it('bad input → 400 naming the field, oversize → 413, unbaked → 409; nothing written', async () => {
    const artist = studio.members.artist.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const cases: [unknown, number, string][] = [
      [{ format: 'webm', byteSize: 10, fileName: 'a.webm', options }, 400, 'format'],
      [{ format: 'gif', byteSize: -1, fileName: 'a.gif', options }, 400, 'byteSize'],
      [{ format: 'gif', byteSize: 10, fileName: '../a.gif', options }, 400, 'fileName'],
      [{ format: 'gif', byteSize: 10, fileName: 'a.mp4', options }, 400, 'fileName'],
      [{ format: 'gif', byteSize: 10, fileName: 'a.gif', options: { ...options, look: 'glitter' } }, 400, 'options.look'],
      [{ format: 'gif', byteSize: 10, fileName: 'a.gif', options: { ...options, last: 900 } }, 400, 'options.last'],
      [{ format: 'gif', byteSize: 10, fileName: 'a.gif', options: { ...options, shutterAngle: 720 } }, 400, 'options.shutterAngle'],
      [{ format: 'gif', byteSize: 10, fileName: 'a.gif', options: { ...options, shutterAngle: 'wide' } }, 400, 'options.shutterAngle'],
      [{ format: 'gif', byteSize: 5 * 1024 ** 3, fileName: 'a.gif', options }, 413, 'byteSize'],
    ];
    for (const [body, status, field] of cases) {
      const res = await artist.post(`/api/versions/${versionId}/exports`, body);
      expect(res.status, JSON.stringify(res.body)).toBe(status);
      expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
    }
    expect(await exportCount(versionId)).toBe(0);
    const unbaked = await makeVersion(studio);
    const res = await artist.post(`/api/versions/${unbaked.versionId}/exports`, { format: 'gif', byteSize: 10, fileName: 'a.gif', options });
    expect(res.status).toBe(409);
  });
});
