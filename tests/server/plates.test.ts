// Plates: presigned upload to the object store, size limits before the store, type by magic bytes after it,
// dimensions from the header, replacing a plate without touching old versions, viewing URLs and the plate's scale,
// and the thumbnail the server makes from a PNG or JPEG plate (320 px wide, aspect kept, area-averaged).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { grantClientShow, makeStudio, unique, type TestStudio } from '../support/app';
import { makePng } from './endpoints';
import { db, closeDb } from '../../src/lib/server/db';
import { assets, shots, shows, versions } from '../../src/lib/server/db/schema';
import { getObject, headObject, putObject } from '../../src/lib/server/storage';
import { sweepUploadPrefix } from '../../src/lib/server/uploads';
import { postUploadForm } from '../support/plates';
import { encodePng } from '../../src/lib/server/png';
import pngjs from 'pngjs';
import jpeg from 'jpeg-js';

let studio: TestStudio;
let showId: number;
beforeAll(async () => {
  studio = await makeStudio();
  const [res] = await db().insert(shows).values({ studioId: studio.id, code: unique('P').slice(0, 12), name: 'Plates', frameRate: '24' });
  showId = Number(res.insertId);
  await grantClientShow(studio, showId);
});
afterAll(closeDb);

const api = () => `/api/studios/${studio.id}`;
const artist = () => studio.members.artist.client;
const MB = 1024 * 1024;

async function newShot() {
  const [res] = await db().insert(shots).values({ studioId: studio.id, showId, code: unique('PL'), firstFrame: 1001, lastFrame: 1050 });
  return Number(res.insertId);
}
const assetCount = async (shotId: number) => Number((await db().select({ n: sql<number>`count(*)` }).from(assets).where(eq(assets.shotId, shotId)))[0].n);

/** Starts an upload, POSTs the bytes with the presigned form, completes it; returns both answers. */
async function upload(shotId: number, bytes: Uint8Array, declared: { fileName: string; contentType: string; kind?: string }, measured: Record<string, number> = {}) {
  const start = await artist().post(`${api()}/shots/${shotId}/plates`, { ...declared, byteSize: bytes.length });
  expect(start.status, JSON.stringify(start.body)).toBe(201);
  const sent = await postUploadForm(start.body.upload, bytes, declared.contentType);
  expect(sent.status, await sent.clone().text()).toBeLessThan(300);
  const complete = await artist().post(`${api()}/plates/${start.body.assetId}/complete`, measured);
  return { start, complete };
}

/** A baseline JPEG header: SOI, JFIF APP0, SOF0 with the size, EOI (ITU-T T.81 marker layout, from memory). */
function makeJpegHeader(width: number, height: number): Uint8Array {
  return new Uint8Array([
    0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00, 0x01, 0x01, 0x00, 0x00, 0x01, 0x00, 0x01, 0x00, 0x00,
    0xff, 0xc0, 0x00, 0x11, 0x08, height >> 8, height & 0xff, width >> 8, width & 0xff, 0x03, 0x01, 0x22, 0x00, 0x02, 0x11, 0x01, 0x03, 0x11, 0x01,
    0xff, 0xd9,
  ]);
}

/** The start of an MP4 file: an ftyp box with major brand isom (ISO/IEC 14496-12 box layout, from memory). */
function makeMp4Header(): Uint8Array {
  const b = Buffer.alloc(32);
  b.writeUInt32BE(24, 0);
  b.write('ftypisom', 4, 'ascii');
  b.writeUInt32BE(0x200, 12);
  b.write('isommp41', 16, 'ascii');
  b.writeUInt32BE(8, 24);
  b.write('free', 28, 'ascii');
  return b;
}

/** A still split down the middle: left half `left`, right half `right` (RGB). */
function halves(width: number, height: number, left: [number, number, number], right: [number, number, number]): Uint8Array {
  const rgb = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) rgb.set(x < width / 2 ? left : right, (y * width + x) * 3);
  return rgb;
}
const toRgba = (rgb: Uint8Array) => {
  const out = new Uint8Array((rgb.length / 3) * 4);
  for (let i = 0; i < rgb.length / 3; i++) out.set([rgb[i * 3], rgb[i * 3 + 1], rgb[i * 3 + 2], 255], i * 4);
  return out;
};
const RED: [number, number, number] = [220, 30, 40];
const BLUE: [number, number, number] = [20, 60, 200];

/** The shot's thumbnail as the API hands it out: its asset row, and its PNG decoded from the short-lived URL. */
async function thumbnailOf(shotId: number) {
  const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
  expect(shot.thumbnailAssetId).toBeTruthy();
  const [asset] = await db().select().from(assets).where(eq(assets.id, shot.thumbnailAssetId!));
  const got = await artist().get(`${api()}/shots/${shotId}`);
  expect(got.status).toBe(200);
  expect(got.body.shot.thumbnail).toMatchObject({ id: asset.id, kind: 'thumbnail' });
  expect(got.body.shot.thumbnailUrl).toMatch(/^https?:\/\//);
  const res = await fetch(got.body.shot.thumbnailUrl);
  expect(res.status).toBe(200);
  const png = pngjs.PNG.sync.read(Buffer.from(await res.arrayBuffer()));
  const pixel = (x: number, y: number) => Array.from(png.data.subarray((y * png.width + x) * 4, (y * png.width + x) * 4 + 3));
  return { shot, asset, png, pixel, url: got.body.shot.thumbnailUrl as string };
}
const near = (got: number[], want: number[], tolerance: number) => got.every((v, i) => Math.abs(v - want[i]) <= tolerance);

describe('plate thumbnails', () => {
  it('a PNG plate gets a PNG thumbnail 320 px wide with the plate’s aspect, listed with a URL', async () => {
    const shotId = await newShot();
    // 640 × 270 (64:27, about 2.37:1): the thumbnail is 320 × 135.
    const { start, complete } = await upload(shotId, encodePng(640, 270, halves(640, 270, RED, BLUE)), { fileName: 'wide.png', contentType: 'image/png' });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    expect(complete.body.thumbnail).toMatchObject({ width: 320, height: 135 });
    const t = await thumbnailOf(shotId);
    expect(t.shot.plateAssetId).toBe(start.body.assetId);
    expect(t.asset).toMatchObject({ id: complete.body.thumbnail.id, kind: 'thumbnail', contentType: 'image/png', format: 'png', width: 320, height: 135, shotId });
    expect([t.png.width, t.png.height]).toEqual([320, 135]);
    // Area averaging keeps flat regions exact: the left half stays red, the right half blue.
    expect(t.pixel(40, 60)).toEqual(RED);
    expect(t.pixel(280, 60)).toEqual(BLUE);
    // The shots table gets the same short-lived URL field.
    const list = await artist().get(`${api()}/shots?showId=${showId}&pageSize=100`);
    const row = list.body.items.find((s: { id: number }) => s.id === shotId);
    expect(row.thumbnailAssetId).toBe(t.asset.id);
    expect((await fetch(row.thumbnailUrl)).status).toBe(200);
    // A shot without a thumbnail lists null.
    const bare = await newShot();
    const again = await artist().get(`${api()}/shots?showId=${showId}&pageSize=100`);
    expect(again.body.items.find((s: { id: number }) => s.id === bare)).toMatchObject({ thumbnailAssetId: null, thumbnailUrl: null });
  });

  it('a JPEG plate gets a PNG thumbnail too (a small plate is scaled up to 320 wide)', async () => {
    const shotId = await newShot();
    // 200 × 150 (4:3): the thumbnail is 320 × 240.
    const rgb = halves(200, 150, RED, BLUE);
    const encoded = jpeg.encode({ width: 200, height: 150, data: toRgba(rgb) }, 95);
    const { complete } = await upload(shotId, new Uint8Array(encoded.data), { fileName: 'plate.jpg', contentType: 'image/jpeg' });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    expect(complete.body.asset).toMatchObject({ width: 200, height: 150, format: 'jpg' });
    const t = await thumbnailOf(shotId);
    expect([t.png.width, t.png.height]).toEqual([320, 240]);
    expect(t.asset.contentType).toBe('image/png');
    // JPEG is lossy (and chroma is subsampled): compare away from the edge, within a few levels.
    expect(near(t.pixel(60, 120), RED, 12), String(t.pixel(60, 120))).toBe(true);
    expect(near(t.pixel(260, 120), BLUE, 12), String(t.pixel(260, 120))).toBe(true);
  });

  it('replacing a plate replaces the thumbnail; a video plate waits for the browser’s thumbnail', async () => {
    const shotId = await newShot();
    const first = await upload(shotId, encodePng(64, 36, halves(64, 36, RED, RED)), { fileName: 'a.png', contentType: 'image/png' });
    const [v] = await db().insert(versions).values({ studioId: studio.id, shotId, number: 1, scene: {}, sceneHash: 't', plateAssetId: first.start.body.assetId });
    const firstThumb = (await thumbnailOf(shotId)).asset.id;
    const second = await upload(shotId, encodePng(48, 48, halves(48, 48, BLUE, BLUE)), { fileName: 'b.png', contentType: 'image/png' });
    const t = await thumbnailOf(shotId);
    expect(t.asset.id).not.toBe(firstThumb);
    expect(t.asset.id).toBe(second.complete.body.thumbnail.id);
    expect([t.png.width, t.png.height]).toEqual([320, 320]);
    expect(t.pixel(160, 160)).toEqual(BLUE);
    // The version keeps the plate it was blocked on.
    const [version] = await db().select().from(versions).where(eq(versions.id, Number(v.insertId)));
    expect(version.plateAssetId).toBe(first.start.body.assetId);

    // A video: the server cannot decode it, so the old still's thumbnail goes and the browser sends the first frame.
    const video = await upload(shotId, makeMp4Header(), { fileName: 'c.mp4', contentType: 'video/mp4' }, { width: 1920, height: 1080, durationSeconds: 2 });
    expect(video.complete.status).toBe(200);
    expect(video.complete.body.thumbnail).toBeNull();
    const [cleared] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect([cleared.plateAssetId, cleared.thumbnailAssetId]).toEqual([video.start.body.assetId, null]);
    expect((await artist().get(`${api()}/shots/${shotId}`)).body.shot).toMatchObject({ thumbnail: null, thumbnailUrl: null });
    const frame = await upload(shotId, encodePng(320, 180, halves(320, 180, BLUE, RED)), { fileName: 'c-thumbnail.png', contentType: 'image/png', kind: 'thumbnail' });
    expect(frame.complete.status).toBe(200);
    expect(frame.complete.body.thumbnail).toBeNull(); // a thumbnail upload makes no thumbnail of its own
    const sent = await thumbnailOf(shotId);
    expect(sent.asset.id).toBe(frame.start.body.assetId);
    expect(sent.shot.plateAssetId).toBe(video.start.body.assetId);
    expect([sent.png.width, sent.png.height]).toEqual([320, 180]);
  });

  it('a plate the server cannot decode still completes, without a thumbnail (the browser makes it)', async () => {
    const shotId = await newShot();
    // Only the header of a JPEG: its size is readable, its picture is not.
    const { complete } = await upload(shotId, makeJpegHeader(640, 360), { fileName: 'header-only.jpg', contentType: 'image/jpeg' });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    expect(complete.body.asset).toMatchObject({ width: 640, height: 360 });
    expect(complete.body.thumbnail).toBeNull();
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect(shot.thumbnailAssetId).toBeNull();
  });

  it('a client sees no thumbnail URL of a show not shared with clients', async () => {
    const shotId = await newShot();
    await upload(shotId, encodePng(32, 18, halves(32, 18, RED, BLUE)), { fileName: 'p.png', contentType: 'image/png' });
    expect((await studio.members.client.client.get(`${api()}/shots/${shotId}`)).status).toBe(404);
  });
});

describe('plate upload', () => {
  it('uploads a PNG still: real dimensions from its header become the shot’s plate size', async () => {
    const shotId = await newShot();
    const { start, complete } = await upload(shotId, makePng(64, 27), { fileName: 'plate.png', contentType: 'image/png' });
    expect(start.body.upload).toMatchObject({ method: 'POST', fields: { 'Content-Type': 'image/png' }, maxBytes: makePng(64, 27).length });
    // The form's policy binds the size to what was declared (S3 POST policy condition content-length-range).
    const policy = JSON.parse(Buffer.from(start.body.upload.fields.Policy, 'base64').toString('utf8'));
    expect(policy.conditions).toContainEqual(['content-length-range', 1, makePng(64, 27).length]);
    expect(policy.conditions).toContainEqual(['eq', '$Content-Type', 'image/png']);
    expect(policy.conditions).toContainEqual({ key: start.body.upload.fields.key });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    expect(complete.body.asset).toMatchObject({ id: start.body.assetId, kind: 'plate', width: 64, height: 27, format: 'png' });
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect([shot.plateAssetId, shot.plateWidth, shot.plateHeight]).toEqual([start.body.assetId, 64, 27]);

    const view = await studio.members.supervisor.client.get(`${api()}/plates/${start.body.assetId}`);
    expect(view.status).toBe(200);
    const got = await fetch(view.body.url);
    expect(got.status).toBe(200);
    expect(Buffer.from(await got.arrayBuffer()).equals(Buffer.from(makePng(64, 27)))).toBe(true);
    const again = await artist().post(`${api()}/plates/${start.body.assetId}/complete`, {});
    expect(again.status).toBe(409);
  });

  it('reads a JPEG’s dimensions, and takes a video’s from the browser', async () => {
    const shotId = await newShot();
    const jpeg = await upload(shotId, makeJpegHeader(4096, 2160), { fileName: 'plate.jpg', contentType: 'image/jpeg' });
    expect(jpeg.complete.status, JSON.stringify(jpeg.complete.body)).toBe(200);
    expect(jpeg.complete.body.asset).toMatchObject({ width: 4096, height: 2160, format: 'jpg' });
    const video = await upload(shotId, makeMp4Header(), { fileName: 'plate.mp4', contentType: 'video/mp4' }, { width: 1920, height: 800, durationSeconds: 2.5 });
    expect(video.complete.status, JSON.stringify(video.complete.body)).toBe(200);
    expect(video.complete.body.asset).toMatchObject({ width: 1920, height: 800, format: 'mp4' });
    const view = await artist().get(`${api()}/plates/${video.start.body.assetId}`);
    expect(view.body.asset).toMatchObject({ contentType: 'video/mp4', durationSeconds: 2.5 });
  });

  it('refuses a text file renamed .png with a clear message, and deletes it', async () => {
    const shotId = await newShot();
    const text = new TextEncoder().encode('These are my notes about the shot, not a picture.\n'.repeat(20));
    const { start, complete } = await upload(shotId, text, { fileName: 'notes.png', contentType: 'image/png' });
    expect(complete.status).toBe(422);
    expect(complete.body.error.code).toBe('unprocessable');
    expect(complete.body.error.message).toMatch(/"notes\.png" is not a PNG image/);
    expect(complete.body.error.message).toMatch(/PNG, JPEG, WebP, MP4, QuickTime, WebM/);
    const [row] = await db().select().from(assets).where(eq(assets.id, start.body.assetId));
    expect(row).toBeUndefined();
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect(shot.plateAssetId).toBeNull();
    expect(await headObject(start.body.upload.fields.key)).toBeNull();
  });

  it('refuses content of another type than declared (a JPEG sent as PNG)', async () => {
    const shotId = await newShot();
    const { complete } = await upload(shotId, makeJpegHeader(10, 10), { fileName: 'frame.png', contentType: 'image/png' });
    expect(complete.status).toBe(422);
    expect(complete.body.error.message).toMatch(/sent as a PNG image, but its content is a JPEG image/);
  });

  it('refuses an oversize declaration with 413 before anything is signed or recorded', async () => {
    const shotId = await newShot();
    const still = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'huge.png', contentType: 'image/png', byteSize: 40 * MB + 1 });
    expect(still.status).toBe(413);
    expect(still.body.error.fields.byteSize).toMatch(/at most 41943040 bytes/);
    expect(still.body.upload).toBeUndefined();
    const video = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'long.mov', contentType: 'video/quicktime', byteSize: 500 * MB + 1 });
    expect(video.status).toBe(413);
    expect(await assetCount(shotId)).toBe(0);
    // At the limits themselves the upload may start (stills 40 MB, video 500 MB).
    expect((await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'ok.png', contentType: 'image/png', byteSize: 40 * MB })).status).toBe(201);
    expect((await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'ok.mov', contentType: 'video/quicktime', byteSize: 500 * MB })).status).toBe(201);
  });

  it('the store refuses a file larger than declared and the form sent to another key', async () => {
    const shotId = await newShot();
    const png = makePng(16, 9);
    const start = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'plate.png', contentType: 'image/png', byteSize: png.length });
    expect(start.status).toBe(201);
    // content-length-range 1…declared (S3 POST policy) → 400 EntityTooLarge (S3 error responses: from memory)
    for (const extra of [1, 3 * MB]) {
      const over = await postUploadForm(start.body.upload, Buffer.concat([Buffer.from(png), Buffer.alloc(extra)]), 'image/png');
      expect(over.status).toBe(400);
      expect(await over.text()).toContain('<Code>EntityTooLarge</Code>');
      expect(await headObject(start.body.upload.fields.key)).toBeNull();
    }
    // Aimed at another shot's checked plate: the key condition fails (S3 POST policy exact match) → 403, that plate unchanged.
    const otherShot = await newShot();
    const kept = makePng(20, 10);
    const { start: keptStart } = await upload(otherShot, kept, { fileName: 'kept.png', contentType: 'image/png' });
    const [keptRow] = await db().select().from(assets).where(eq(assets.id, keptStart.body.assetId));
    const moved = await postUploadForm({ url: start.body.upload.url, fields: { ...start.body.upload.fields, key: keptRow.storageKey } }, png, 'image/png');
    expect(moved.status).toBe(403);
    expect(Buffer.from(await getObject(keptRow.storageKey)).equals(Buffer.from(kept))).toBe(true);
    // The same form with the declared file still works, and completes.
    expect((await postUploadForm(start.body.upload, png, 'image/png')).status).toBe(204);
    expect((await artist().post(`${api()}/plates/${start.body.assetId}/complete`, {})).status).toBe(200);
  });

  it('a form used again after completion cannot replace the checked plate; the stray object it leaves is swept', async () => {
    const shotId = await newShot();
    const png = makePng(16, 9);
    const { start, complete } = await upload(shotId, png, { fileName: 'plate.png', contentType: 'image/png' });
    expect(complete.status, JSON.stringify(complete.body)).toBe(200);
    const formKey: string = start.body.upload.fields.key;
    const [row] = await db().select().from(assets).where(eq(assets.id, start.body.assetId));
    // The form wrote under uploads/; what was checked and kept is a copy at a key no form names.
    expect(formKey.startsWith(`uploads/${studio.id}/`)).toBe(true);
    expect(row.storageKey.startsWith(`studios/${studio.id}/shots/${shotId}/plates/`)).toBe(true);
    expect(await headObject(formKey)).toBeNull();
    // The same form, still within its 15 minutes, takes other bytes of the bound type and size…
    const junk = new Uint8Array(png.length).fill(0x41);
    expect((await postUploadForm(start.body.upload, junk, 'image/png')).status).toBe(204);
    // …which land beside the plate, not over it.
    const view = await artist().get(`${api()}/plates/${start.body.assetId}`);
    expect(Buffer.from(await (await fetch(view.body.url)).arrayBuffer()).equals(Buffer.from(png))).toBe(true);
    expect(await headObject(formKey)).not.toBeNull();
    // Housekeeping's sweep of uploads/ (here: this studio's part, everything written until now) removes the stray.
    expect(await sweepUploadPrefix(new Date(Date.now() + 1000), `uploads/${studio.id}/`)).toBeGreaterThanOrEqual(1);
    expect(await headObject(formKey)).toBeNull();
    expect(await headObject(row.storageKey)).not.toBeNull();
  });

  it('checks the real size on completion too: an object larger than declared (a store that ignored the range) is refused and deleted', async () => {
    const shotId = await newShot();
    const start = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'thumb.png', contentType: 'image/png', byteSize: 1000, kind: 'thumbnail' });
    expect(start.status).toBe(201);
    const big = Buffer.concat([Buffer.from(makePng(4, 4)), Buffer.alloc(3 * MB)]);
    // Written past the form, straight into the store, as a store that does not enforce content-length-range would take it.
    await putObject(start.body.upload.fields.key, big, 'image/png');
    const complete = await artist().post(`${api()}/plates/${start.body.assetId}/complete`, {});
    expect(complete.status).toBe(413);
    expect(await assetCount(shotId)).toBe(0);
    expect(await headObject(start.body.upload.fields.key)).toBeNull();
  });

  it('refuses bad declarations naming the field, and a completion before the file arrived', async () => {
    const shotId = await newShot();
    const bad = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: '', contentType: 'text/plain', byteSize: -5 });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['byteSize', 'contentType', 'fileName']);
    const thumbVideo = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 't.mp4', contentType: 'video/mp4', byteSize: 10, kind: 'thumbnail' });
    expect(thumbVideo.status).toBe(400);
    expect(thumbVideo.body.error.fields.contentType).toMatch(/thumbnail/);
    const start = await artist().post(`${api()}/shots/${shotId}/plates`, { fileName: 'p.png', contentType: 'image/png', byteSize: 100 });
    const early = await artist().post(`${api()}/plates/${start.body.assetId}/complete`, {});
    expect(early.status).toBe(409);
    expect(early.body.error.message).toMatch(/upload form first/);
    const pendingView = await artist().get(`${api()}/plates/${start.body.assetId}`);
    expect(pendingView.status).toBe(404);
  });

  it('replaces a plate; a version keeps the plate it was blocked on; a thumbnail is set separately', async () => {
    const shotId = await newShot();
    const first = await upload(shotId, makePng(32, 18), { fileName: 'v1.png', contentType: 'image/png' });
    const oldPlate = first.start.body.assetId;
    const [v] = await db().insert(versions).values({ studioId: studio.id, shotId, number: 1, scene: {}, sceneHash: 'p', plateAssetId: oldPlate });
    const second = await upload(shotId, makePng(48, 20), { fileName: 'v2.png', contentType: 'image/png' });
    expect(second.complete.status).toBe(200);
    const thumb = await upload(shotId, makePng(8, 4), { fileName: 'thumb.png', contentType: 'image/png', kind: 'thumbnail' });
    expect(thumb.complete.status).toBe(200);
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect([shot.plateAssetId, shot.plateWidth, shot.plateHeight, shot.thumbnailAssetId]).toEqual([second.start.body.assetId, 48, 20, thumb.start.body.assetId]);
    const [version] = await db().select().from(versions).where(eq(versions.id, Number(v.insertId)));
    expect(version.plateAssetId).toBe(oldPlate);
    // The old plate can still be viewed (the player shows old versions on their plate).
    expect((await artist().get(`${api()}/plates/${oldPlate}`)).status).toBe(200);
    const got = await artist().get(`${api()}/shots/${shotId}`);
    expect(got.body.shot.plate).toMatchObject({ id: second.start.body.assetId, width: 48 });
    expect(got.body.shot.thumbnail).toMatchObject({ id: thumb.start.body.assetId });
  });

  it('a client cannot view plates of shows not shared with clients; another studio gets 404', async () => {
    const shotId = await newShot();
    const { start } = await upload(shotId, makePng(8, 8), { fileName: 'c.png', contentType: 'image/png' });
    expect((await studio.members.client.client.get(`${api()}/plates/${start.body.assetId}`)).status).toBe(404);
    const other = await makeStudio();
    expect((await other.members.owner.client.get(`/api/studios/${other.id}/plates/${start.body.assetId}`)).status).toBe(404);
    expect((await other.members.owner.client.post(`/api/studios/${other.id}/plates/${start.body.assetId}/complete`, {})).status).toBe(404);
  });
});

describe('plate scale', () => {
  it('stores metres per pixel from a line of known length', async () => {
    const shotId = await newShot();
    const res = await artist().post(`${api()}/shots/${shotId}/scale`, { pixels: 400, metres: 2 });
    expect(res.status).toBe(200);
    // 2 m over 400 px = 0.005 m per pixel
    expect(res.body.scale.metresPerPixel).toBeCloseTo(0.005, 12);
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect(shot.metresPerPixel).toBeCloseTo(0.005, 12);
  });

  it('refuses a zero or negative length naming the field, changing nothing', async () => {
    const shotId = await newShot();
    const res = await artist().post(`${api()}/shots/${shotId}/scale`, { pixels: 0, metres: -1 });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['metres', 'pixels']);
    const [shot] = await db().select().from(shots).where(eq(shots.id, shotId));
    expect(shot.metresPerPixel).toBeNull();
  });
});
