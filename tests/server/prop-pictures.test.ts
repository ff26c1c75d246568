// Prop pictures: uploaded like a plate (start → presigned POST → complete), refused with a 4xx naming the field when
// the type, size, transparency or dimensions are wrong (the stored object deleted), listed for the studio's artists,
// named to whoever may see a version whose props use them, and purged when an upload is never completed.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { makeStudio, type TestStudio } from '../support/app';
import { makePng, makeVersion } from './endpoints';
import { postUploadForm } from '../support/plates';
import { db, closeDb } from '../../src/lib/server/db';
import { assets, versions } from '../../src/lib/server/db/schema';
import { headObject, keysOlderThan } from '../../src/lib/server/storage';
import { encodePng } from '../../src/lib/server/png';
import { purgeStaleUploads } from '../../src/lib/server/housekeeping';
import { parseScene } from '../../src/lib/scene';
import { tinyScene } from '../support/scenes';

let studio: TestStudio;
let other: TestStudio;
beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
});
afterAll(closeDb);

const api = (s = studio) => `/api/studios/${s.id}/pictures`;
const artist = () => studio.members.artist.client;
const MB = 1024 * 1024;

/** An RGBA PNG with a transparent border round an opaque square (a cut-out). */
function cutOut(width: number, height: number): Uint8Array {
  const rgba = new Uint8Array(width * height * 4);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const inside = x >= width / 4 && x < (3 * width) / 4 && y >= height / 4 && y < (3 * height) / 4;
      rgba.set([210, 60, 50, inside ? 255 : 0], (y * width + x) * 4);
    }
  return encodePng(width, height, rgba, 4);
}

/**
 * A lossless WebP header: RIFF/WEBP, a VP8L chunk with signature 0x2f, then 14 bits width − 1, 14 bits height − 1,
 * 1 bit alpha_is_used, 3 bits version 0 (Google, "WebP Lossless Bitstream Specification"; RIFF layout from the
 * "WebP Container Specification"; bit positions from memory). Enough for the header checks; not a decodable picture.
 */
function webpLossless(width: number, height: number, alpha: boolean): Uint8Array {
  const b = Buffer.alloc(30);
  b.write('RIFF', 0, 'ascii');
  b.writeUInt32LE(22, 4);
  b.write('WEBP', 8, 'ascii');
  b.write('VP8L', 12, 'ascii');
  b.writeUInt32LE(10, 16);
  b[20] = 0x2f;
  b.writeUInt32LE(((width - 1) | ((height - 1) << 14) | ((alpha ? 1 : 0) << 28)) >>> 0, 21);
  return b;
}

/** Starts an upload, POSTs the bytes with the presigned form and completes it; returns both answers. */
async function upload(bytes: Uint8Array, declared: { fileName: string; contentType: string }) {
  const start = await artist().post(api(), { ...declared, byteSize: bytes.length });
  expect(start.status, JSON.stringify(start.body)).toBe(201);
  const sent = await postUploadForm(start.body.upload, bytes, declared.contentType);
  expect(sent.status, await sent.clone().text()).toBeLessThan(300);
  const complete = await artist().post(`${api()}/${start.body.assetId}/complete`, {});
  return { start, complete };
}

async function assetRow(id: number) {
  const [row] = await db().select().from(assets).where(eq(assets.id, id));
  return row;
}

describe('prop picture upload', () => {
  it('takes a PNG with alpha and records its size, dimensions and SHA-256', async () => {
    const png = cutOut(64, 96);
    const { start, complete } = await upload(png, { fileName: 'can.png', contentType: 'image/png' });
    expect(start.body.upload.method).toBe('POST');
    expect(start.body.upload.maxBytes).toBe(png.length);
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    // SHA-256 by Node's own implementation (FIPS 180-4), independent of the server's streaming digest.
    const sha = createHash('sha256').update(png).digest('hex');
    expect(complete.body.picture).toMatchObject({ id: start.body.assetId, fileName: 'can.png', contentType: 'image/png', width: 64, height: 96, byteSize: png.length, sha256: sha });

    const list = await artist().get(api());
    expect(list.status).toBe(200);
    const listed = list.body.pictures.find((p: { id: number }) => p.id === start.body.assetId);
    expect(listed).toMatchObject({ width: 64, height: 96 });
    const fetched = new Uint8Array(await (await fetch(listed.url)).arrayBuffer());
    expect(createHash('sha256').update(fetched).digest('hex')).toBe(sha);
    // Another studio's list does not show it.
    const theirs = await other.members.artist.client.get(api(other));
    expect(theirs.body.pictures.some((p: { id: number }) => p.id === start.body.assetId)).toBe(false);
  });

  it('takes a lossless WebP whose header says it uses alpha', async () => {
    const { complete } = await upload(webpLossless(40, 30, true), { fileName: 'can.webp', contentType: 'image/webp' });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    expect(complete.body.picture).toMatchObject({ contentType: 'image/webp', width: 40, height: 30 });
  });

  it('refuses a type without alpha at the start, naming contentType', async () => {
    for (const contentType of ['image/jpeg', 'video/mp4', 'image/gif']) {
      const res = await artist().post(api(), { fileName: 'can.jpg', contentType, byteSize: 1000 });
      expect(res.status).toBe(400);
      expect(Object.keys(res.body.error.fields)).toEqual(['contentType']);
    }
  });

  it('refuses an oversize declaration before anything is stored (413 naming byteSize)', async () => {
    const before = await artist().get(api());
    const res = await artist().post(api(), { fileName: 'huge.png', contentType: 'image/png', byteSize: 8 * MB + 1 });
    expect(res.status).toBe(413);
    expect(res.body.error.fields.byteSize).toMatch(/8 MB/);
    const after = await artist().get(api());
    expect(after.body.pictures.length).toBe(before.body.pictures.length);
  });

  it('refuses unknown fields and bad sizes, naming them', async () => {
    const extra = await artist().post(api(), { fileName: 'a.png', contentType: 'image/png', byteSize: 10, shotId: 3 });
    expect(extra.status).toBe(400);
    const zero = await artist().post(api(), { fileName: 'a.png', contentType: 'image/png', byteSize: 0 });
    expect(zero.status).toBe(400);
    expect(Object.keys(zero.body.error.fields)).toEqual(['byteSize']);
  });

  it('refuses a PNG without transparency (422 naming file) and deletes what was sent', async () => {
    const { start, complete } = await upload(makePng(32, 32), { fileName: 'flat.png', contentType: 'image/png' });
    expect(complete.status).toBe(422);
    expect(complete.body.error.fields.file).toBe('has no alpha channel');
    const row = await assetRow(start.body.assetId);
    expect(row).toBeUndefined();
  });

  it('refuses a WebP without alpha and a file whose content is not its declared type', async () => {
    const flat = await upload(webpLossless(20, 20, false), { fileName: 'flat.webp', contentType: 'image/webp' });
    expect(flat.complete.status).toBe(422);
    expect(flat.complete.body.error.fields.file).toBe('has no alpha channel');
    // A WebP sent as a PNG (file-type reads the magic bytes).
    const lying = await upload(webpLossless(20, 20, true), { fileName: 'can.png', contentType: 'image/png' });
    expect(lying.complete.status).toBe(422);
    expect(lying.complete.body.error.fields.file).toBe('content does not match its type');
  });

  it('refuses pictures larger than 2048 pixels on a side', async () => {
    const finalPrefix = `studios/${studio.id}/pictures/`;
    const kept = await keysOlderThan(finalPrefix, new Date(Date.now() + 60_000));
    const { start, complete } = await upload(cutOut(2050, 4), { fileName: 'wide.png', contentType: 'image/png' });
    expect(complete.status).toBe(422);
    expect(complete.body.error.fields.file).toMatch(/2048 pixels/);
    // The form writes under uploads/; completion moved the file to its final key, checked it there and deleted it.
    const formKey: string = start.body.upload.fields.key ?? start.body.upload.fields.Key ?? '';
    expect(formKey.startsWith(`uploads/${studio.id}/`)).toBe(true);
    expect(await headObject(formKey)).toBeNull();
    expect(await keysOlderThan(finalPrefix, new Date(Date.now() + 60_000))).toEqual(kept);
  });

  it('refuses a file larger than declared, at the store or on completion', async () => {
    const png = cutOut(64, 64);
    const start = await artist().post(api(), { fileName: 'can.png', contentType: 'image/png', byteSize: 100 });
    expect(start.status).toBe(201);
    const sent = await postUploadForm(start.body.upload, png, 'image/png');
    if (sent.status < 300) {
      // A store that does not enforce the policy's content-length-range: completion still refuses it.
      const complete = await artist().post(`${api()}/${start.body.assetId}/complete`, {});
      expect(complete.status).toBe(413);
      expect(Object.keys(complete.body.error.fields)).toEqual(['byteSize']);
    } else expect(sent.status).toBeGreaterThanOrEqual(400);
    const row = await assetRow(start.body.assetId);
    expect(row === undefined || (row.meta as { state: string }).state === 'pending').toBe(true);
  });

  it('answers 409 when completing before the file arrived, and a client may not upload', async () => {
    const start = await artist().post(api(), { fileName: 'late.png', contentType: 'image/png', byteSize: 500 });
    const early = await artist().post(`${api()}/${start.body.assetId}/complete`, {});
    expect(early.status).toBe(409);
    const client = await studio.members.client.client.post(api(), { fileName: 'c.png', contentType: 'image/png', byteSize: 500 });
    expect(client.status).toBe(403);
  });

  it('purges an upload never completed (housekeeping)', async () => {
    const start = await artist().post(api(), { fileName: 'never.png', contentType: 'image/png', byteSize: 500 });
    expect(await assetRow(start.body.assetId)).toBeDefined();
    // Dated long ago, so the purge's cut-off touches this row and no other test's upload in flight.
    await db().update(assets).set({ createdAt: new Date('2000-01-01T00:00:00Z') }).where(eq(assets.id, start.body.assetId));
    await purgeStaleUploads(new Date('2000-01-02T00:00:00Z'));
    expect(await assetRow(start.body.assetId)).toBeUndefined();
  });
});

describe('a version whose prop is drawn as a picture', () => {
  it('names the picture with its clip URLs, to a client of the shared version too', async () => {
    const { complete } = await upload(cutOut(32, 64), { fileName: 'can.png', contentType: 'image/png' });
    const pictureId = complete.body.picture.id as number;
    // A picture id of another studio in the same scene is ignored (never signed).
    const theirs = await (async () => {
      const start = await other.members.artist.client.post(api(other), { fileName: 'x.png', contentType: 'image/png', byteSize: cutOut(8, 8).length });
      await postUploadForm(start.body.upload, cutOut(8, 8), 'image/png');
      const done = await other.members.artist.client.post(`${api(other)}/${start.body.assetId}/complete`, {});
      return done.body.picture.id as number;
    })();
    const { versionId } = await makeVersion(studio, { baked: true });
    const parsed = parseScene({
      ...tinyScene(),
      version: 2,
      props: [
        { id: 'can', shape: { type: 'rect', x: 0.3, y: 0.3, width: 0.05, height: 0.1 }, keys: [{ frame: 1001 }], picture: pictureId },
        { id: 'lid', shape: { type: 'rect', x: 0.1, y: 0.4, width: 0.05, height: 0.02 }, keys: [{ frame: 1001 }], picture: theirs },
      ],
    });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    await db().update(versions).set({ scene: parsed.scene }).where(eq(versions.id, versionId));

    for (const who of ['artist', 'client'] as const) {
      const res = await studio.members[who].client.get(`/api/versions/${versionId}/clip`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      expect(res.body.propPictures).toHaveLength(1);
      expect(res.body.propPictures[0]).toMatchObject({ propId: 'can', pictureId, width: 32, height: 64 });
      const img = await fetch(res.body.propPictures[0].url);
      expect(img.status).toBe(200);
    }
  });
});
