// Every JSON endpoint with who may call it. The authorization matrix walks this list, and a test fails
// when a file under src/pages/api exports a method that is missing here: add new endpoints as you build them.
import type { Role } from '../../src/lib/vocab';
import type { TestStudio } from '../support/app';
import { grantClientShow, makeUser, membershipId, unique } from '../support/app';
import { db } from '../../src/lib/server/db';
import { assets, invitations, memberships, shots, shows, versions } from '../../src/lib/server/db/schema';
import { sceneHash, parseScene } from '../../src/lib/scene';
import { tinyScene } from '../support/scenes';
import { hashToken } from '../../src/lib/server/tokens';

/** Who may call: anyone, any signed-in person, a role or above, or the client role alone ('client-only'). */
export type Access = 'public' | 'signed-in' | Role | 'client-only';

export interface EndpointCase {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  /** The file route under src/pages, e.g. /api/studios/[studioId]/members */
  route: string;
  access: Access;
  /** Builds the concrete path (and may create rows the call will use) for one call. */
  path: (s: TestStudio) => Promise<string> | string;
  body?: (s: TestStudio) => unknown;
}

async function spareMember(s: TestStudio, role: Role = 'artist') {
  const u = await makeUser('spare');
  await db().insert(memberships).values({ studioId: s.id, userId: u.id, role });
  return membershipId(s.id, u.id);
}

async function openInvitation(s: TestStudio) {
  const [res] = await db()
    .insert(invitations)
    .values({ studioId: s.id, email: `${unique('inv')}@test.example`, role: 'artist', tokenHash: hashToken(unique('t')), expiresAt: new Date(Date.now() + 3600_000) });
  return Number(res.insertId);
}

/** Makes a show and a shot in the studio directly in the database. */
export async function makeShot(s: TestStudio) {
  const [show] = await db().insert(shows).values({ studioId: s.id, code: unique('SH').slice(0, 30), name: 'Test show' });
  await grantClientShow(s, Number(show.insertId));
  const [shot] = await db()
    .insert(shots)
    .values({ studioId: s.id, showId: Number(show.insertId), code: unique('SHOT'), firstFrame: 1001, lastFrame: 1010 });
  return Number(shot.insertId);
}

/** Makes a version of a new shot; `baked` gives it a clip asset and shares it with clients. */
export async function makeVersion(s: TestStudio, opts: { baked?: boolean; shared?: boolean } = {}) {
  const shotId = await makeShot(s);
  const parsed = parseScene(tinyScene());
  if (!parsed.ok) throw new Error('tiny scene is invalid');
  let clipAssetId: number | null = null;
  if (opts.baked) {
    const [a] = await db().insert(assets).values({ studioId: s.id, kind: 'clip', storageKey: `test/${unique('clip')}`, contentType: 'application/x-tidemark-clip' });
    clipAssetId = Number(a.insertId);
  }
  const [v] = await db()
    .insert(versions)
    .values({
      studioId: s.id,
      shotId,
      number: 1,
      scene: parsed.scene,
      sceneHash: sceneHash(parsed.scene),
      bakeState: opts.baked ? 'baked' : 'none',
      clipAssetId,
      sharedWithClient: opts.shared ?? opts.baked ?? false,
      // A client sees shared versions past draft only (access.ts), so a shared fixture is submitted.
      reviewState: (opts.shared ?? opts.baked ?? false) ? 'submitted' : 'draft',
    });
  return { shotId, versionId: Number(v.insertId) };
}

export const ENDPOINTS: EndpointCase[] = [
  { method: 'POST', route: '/api/auth/sign-in', access: 'public', path: () => '/api/auth/sign-in' },
  { method: 'POST', route: '/api/auth/sign-out', access: 'public', path: () => '/api/auth/sign-out' },
  { method: 'POST', route: '/api/auth/password-reset', access: 'public', path: () => '/api/auth/password-reset' },
  { method: 'POST', route: '/api/auth/password-reset/confirm', access: 'public', path: () => '/api/auth/password-reset/confirm' },
  { method: 'GET', route: '/api/invitations/[token]', access: 'public', path: () => '/api/invitations/x' },
  { method: 'POST', route: '/api/invitations/[token]/accept', access: 'public', path: () => '/api/invitations/x/accept' },
  { method: 'GET', route: '/api/me', access: 'signed-in', path: () => '/api/me' },
  { method: 'GET', route: '/api/studios/[studioId]/members', access: 'artist', path: (s) => `/api/studios/${s.id}/members` },
  {
    method: 'PATCH',
    route: '/api/studios/[studioId]/members/[memberId]',
    access: 'owner',
    path: async (s) => `/api/studios/${s.id}/members/${await spareMember(s)}`,
    body: () => ({ role: 'supervisor' }),
  },
  {
    method: 'DELETE',
    route: '/api/studios/[studioId]/members/[memberId]',
    access: 'owner',
    path: async (s) => `/api/studios/${s.id}/members/${await spareMember(s)}`,
  },
  { method: 'GET', route: '/api/studios/[studioId]/invitations', access: 'owner', path: (s) => `/api/studios/${s.id}/invitations` },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/invitations',
    access: 'owner',
    path: (s) => `/api/studios/${s.id}/invitations`,
    body: () => ({ email: `${unique('m')}@test.example`, role: 'artist' }),
  },
  {
    method: 'DELETE',
    route: '/api/studios/[studioId]/invitations/[invitationId]',
    access: 'owner',
    path: async (s) => `/api/studios/${s.id}/invitations/${await openInvitation(s)}`,
  },
  {
    method: 'POST',
    route: '/api/shots/[shotId]/versions',
    access: 'artist',
    path: async (s) => `/api/shots/${await makeShot(s)}/versions`,
    body: () => ({ scene: tinyScene(), comment: 'matrix' }),
  },
  { method: 'GET', route: '/api/shots/[shotId]/versions', access: 'client', path: async (s) => `/api/shots/${(await makeVersion(s, { baked: true })).shotId}/versions` },
  { method: 'GET', route: '/api/versions/[versionId]', access: 'client', path: async (s) => `/api/versions/${(await makeVersion(s, { baked: true })).versionId}` },
  { method: 'POST', route: '/api/versions/[versionId]/bake', access: 'artist', path: async (s) => `/api/versions/${(await makeVersion(s)).versionId}/bake` },
  { method: 'GET', route: '/api/versions/[versionId]/bake', access: 'artist', path: async (s) => `/api/versions/${(await makeVersion(s)).versionId}/bake` },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/bake/cancel',
    access: 'artist',
    path: async (s) => {
      const { versionId } = await makeVersion(s);
      // A queued job far in the future so no worker takes it before the call.
      const { bakeJobs } = await import('../../src/lib/server/db/schema');
      await db().insert(bakeJobs).values({ studioId: s.id, versionId, sceneHash: 'x', framesTotal: 10, leaseExpiresAt: new Date(Date.now() + 3600_000) });
      return `/api/versions/${versionId}/bake/cancel`;
    },
  },
  { method: 'GET', route: '/api/versions/[versionId]/clip', access: 'client', path: async (s) => `/api/versions/${(await makeVersion(s, { baked: true })).versionId}/clip` },
];

// ── Shot library, plates, people ─────────────────────────────────────────────────────────────────────────────────
// Rows are made per call. A client may read only shows with a version shared with clients, so the rows the read
// endpoints use are "shared". Bodies that need an id made by path() read it from `made` (path runs first).
import { deflateSync } from 'node:zlib';
import * as tables from '../../src/lib/server/db/schema';
import { putObject } from '../../src/lib/server/storage';

const made = new Map<number, { showId?: number; shotId?: number }>();

/** A show (shared with clients when asked: it gets a shot with a version shared with clients). */
export async function libraryShow(s: TestStudio, shared = true): Promise<number> {
  const [res] = await db().insert(tables.shows).values({ studioId: s.id, code: unique('SH').slice(0, 32), name: 'Matrix show', frameRate: '24' });
  const showId = Number(res.insertId);
  await grantClientShow(s, showId);
  if (shared) {
    const shotId = await libraryShot(s, showId);
    await db().insert(tables.versions).values({ studioId: s.id, shotId, number: 1, scene: {}, sceneHash: 'matrix', sharedWithClient: true, reviewState: 'submitted' });
  }
  made.set(s.id, { ...made.get(s.id), showId });
  return showId;
}

/** A shot in the given show (or in a new shared show). */
export async function libraryShot(s: TestStudio, showId?: number): Promise<number> {
  const show = showId ?? (await libraryShow(s));
  const [res] = await db().insert(tables.shots).values({ studioId: s.id, showId: show, code: unique('S'), firstFrame: 1001, lastFrame: 1050 });
  const shotId = Number(res.insertId);
  // In a new shared show the shot itself has a shared version: a client sees a shot only through one (access.ts).
  if (showId === undefined) await db().insert(tables.versions).values({ studioId: s.id, shotId, number: 1, scene: {}, sceneHash: 'matrix', sharedWithClient: true, reviewState: 'submitted' });
  made.set(s.id, { ...made.get(s.id), shotId });
  return shotId;
}

/** A valid RGB PNG of the given size (signature, IHDR, IDAT, IEND; PNG specification, W3C 2003). */
export function makePng(width: number, height: number): Uint8Array {
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc32 = (bytes: Uint8Array) => {
    let c = 0xffffffff;
    for (const b of bytes) c = crcTable[(c ^ b) & 0xff] ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type: string, data: Uint8Array) => {
    const out = Buffer.alloc(12 + data.length);
    out.writeUInt32BE(data.length, 0);
    out.write(type, 4, 'ascii');
    Buffer.from(data).copy(out, 8);
    out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
    return out;
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // RGB
  const raw = Buffer.alloc((width * 3 + 1) * height, 0x40);
  for (let y = 0; y < height; y++) raw[y * (width * 3 + 1)] = 0; // filter type 0 per row
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', new Uint8Array(0))]);
}

/** A plate asset on a shot of a shared show: 'ready' (viewable) or 'pending' with a PNG already in the store. */
export async function plateAsset(s: TestStudio, state: 'ready' | 'pending'): Promise<number> {
  const shotId = await libraryShot(s);
  const storageKey = `studios/${s.id}/shots/${shotId}/plates/${unique('matrix')}.png`;
  if (state === 'pending') await putObject(storageKey, makePng(8, 4), 'image/png');
  const [res] = await db()
    .insert(tables.assets)
    .values({ studioId: s.id, kind: 'plate', storageKey, contentType: 'image/png', byteSize: 100, shotId, meta: { state, fileName: 'matrix.png', declaredSize: 100 } });
  return Number(res.insertId);
}

const lib = (s: TestStudio) => `/api/studios/${s.id}`;

ENDPOINTS.push(
  { method: 'GET', route: '/api/studios/[studioId]/people', access: 'artist', path: (s) => `${lib(s)}/people` },
  { method: 'GET', route: '/api/studios/[studioId]/shows', access: 'client', path: (s) => `${lib(s)}/shows?sort=shots&order=desc` },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shows',
    access: 'supervisor',
    path: (s) => `${lib(s)}/shows`,
    body: () => ({ code: unique('M'), name: 'Matrix', frameRate: '25' }),
  },
  { method: 'GET', route: '/api/studios/[studioId]/shows/[showId]', access: 'client', path: async (s) => `${lib(s)}/shows/${await libraryShow(s)}` },
  {
    method: 'PATCH',
    route: '/api/studios/[studioId]/shows/[showId]',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shows/${await libraryShow(s, false)}`,
    body: () => ({ name: 'Renamed' }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shows/[showId]/archive',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shows/${await libraryShow(s, false)}/archive`,
    body: () => ({ archived: true }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shows/[showId]/import/preview',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shows/${await libraryShow(s, false)}/import/preview`,
    body: () => ({ format: 'csv', text: 'code,first,last\nM_010,1001,1010\n' }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shows/[showId]/import/confirm',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shows/${await libraryShow(s, false)}/import/confirm`,
    body: () => ({ format: 'csv', text: 'code,first,last\nM_010,1001,1010\n' }),
  },
  { method: 'GET', route: '/api/studios/[studioId]/settings', access: 'client', path: (s) => `${lib(s)}/settings` },
  { method: 'PATCH', route: '/api/studios/[studioId]/settings', access: 'owner', path: (s) => `${lib(s)}/settings`, body: () => ({ handleConvention: 'head-handle' }) },
  {
    method: 'GET',
    route: '/api/studios/[studioId]/shows/[showId]/turnover',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shows/${await libraryShow(s)}/turnover?approval=internal`,
  },
  { method: 'GET', route: '/api/studios/[studioId]/shots', access: 'client', path: (s) => `${lib(s)}/shots?sort=status` },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shots',
    access: 'supervisor',
    path: async (s) => {
      await libraryShow(s, false);
      return `${lib(s)}/shots`;
    },
    body: (s) => ({ showId: made.get(s.id)?.showId, code: unique('M'), lastFrame: 1100 }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shots/bulk-status',
    access: 'supervisor',
    path: async (s) => {
      await libraryShot(s);
      return `${lib(s)}/shots/bulk-status`;
    },
    body: (s) => ({ ids: [made.get(s.id)?.shotId], status: 'on hold' }),
  },
  { method: 'GET', route: '/api/studios/[studioId]/shots/[shotId]', access: 'client', path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}` },
  {
    method: 'PATCH',
    route: '/api/studios/[studioId]/shots/[shotId]',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}`,
    body: () => ({ description: 'changed', lastFrame: 1060 }),
  },
  {
    method: 'PATCH',
    route: '/api/studios/[studioId]/shots/[shotId]/workflow',
    access: 'artist',
    path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}/workflow`,
    body: () => ({ status: 'in review' }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shots/[shotId]/archive',
    access: 'supervisor',
    path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}/archive`,
    body: () => ({ archived: true }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shots/[shotId]/plates',
    access: 'artist',
    path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}/plates`,
    body: () => ({ fileName: 'plate.png', contentType: 'image/png', byteSize: 2048 }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/shots/[shotId]/scale',
    access: 'artist',
    path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}/scale`,
    body: () => ({ pixels: 400, metres: 2 }),
  },
  { method: 'GET', route: '/api/studios/[studioId]/plates/[assetId]', access: 'client', path: async (s) => `${lib(s)}/plates/${await plateAsset(s, 'ready')}` },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/plates/[assetId]/complete',
    access: 'artist',
    path: async (s) => `${lib(s)}/plates/${await plateAsset(s, 'pending')}/complete`,
  },
);

ENDPOINTS.push({
  method: 'GET',
  route: '/api/studios/[studioId]/shots/[shotId]/activity',
  access: 'artist',
  path: async (s) => `${lib(s)}/shots/${await libraryShot(s)}/activity`,
});

// ── Review and approval ──────────────────────────────────────────────────────────────────────────────────────────
// A client may see only versions shared with clients and past draft, so the versions client-readable endpoints use are
// submitted and shared.

/** A baked version in a review state (shared with clients unless it is a draft). */
export async function reviewVersion(s: TestStudio, state: 'draft' | 'submitted' = 'submitted', shotId?: number) {
  const made = await makeVersion(s, { baked: true, shared: state !== 'draft' });
  if (state !== 'draft') await db().update(versions).set({ reviewState: state }).where(eqId(made.versionId));
  if (shotId !== undefined) {
    const [{ n }] = await db().select({ n: sqlCount() }).from(versions).where(eqShot(shotId));
    await db().update(versions).set({ shotId, number: Number(n) + 1 }).where(eqId(made.versionId));
    return { shotId, versionId: made.versionId };
  }
  return made;
}

let dismissedVersionId = 0;

async function reviewNote(s: TestStudio) {
  const { versionId } = await reviewVersion(s);
  const [res] = await db().insert(tables.notes).values({ studioId: s.id, versionId, frame: 1002, body: 'matrix note', internal: false });
  return Number(res.insertId);
}

async function comparePair(s: TestStudio) {
  const first = await reviewVersion(s);
  const second = await reviewVersion(s, 'submitted', first.shotId);
  return `/api/studios/${s.id}/compare?a=${first.versionId}&b=${second.versionId}`;
}

import { eq as eqCol, sql as sqlTag } from 'drizzle-orm';
const eqId = (id: number) => eqCol(versions.id, id);
const eqShot = (shotId: number) => eqCol(versions.shotId, shotId);
const sqlCount = () => sqlTag<number>`count(*)`;

ENDPOINTS.push(
  { method: 'GET', route: '/api/versions/[versionId]/review', access: 'client', path: async (s) => `/api/versions/${(await reviewVersion(s)).versionId}/review` },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/review/submit',
    access: 'artist',
    path: async (s) => `/api/versions/${(await reviewVersion(s, 'draft')).versionId}/review/submit`,
    body: () => ({ comment: 'matrix' }),
  },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/review/decide',
    access: 'supervisor',
    path: async (s) => `/api/versions/${(await reviewVersion(s)).versionId}/review/decide`,
    body: () => ({ decision: 'approved' }),
  },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/share',
    access: 'supervisor',
    path: async (s) => `/api/versions/${(await reviewVersion(s)).versionId}/share`,
    body: () => ({ shared: false }),
  },
  { method: 'GET', route: '/api/versions/[versionId]/notes', access: 'client', path: async (s) => `/api/versions/${(await reviewVersion(s)).versionId}/notes?carried=1` },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/notes',
    access: 'client',
    path: async (s) => `/api/versions/${(await reviewVersion(s)).versionId}/notes`,
    body: () => ({ frame: 1003, body: 'matrix note', point: { x: 0.5, y: 0.5 } }),
  },
  { method: 'PATCH', route: '/api/notes/[noteId]', access: 'artist', path: async (s) => `/api/notes/${await reviewNote(s)}`, body: () => ({ resolved: true }) },
  { method: 'GET', route: '/api/studios/[studioId]/inbox', access: 'client', path: (s) => `/api/studios/${s.id}/inbox` },
  { method: 'POST', route: '/api/studios/[studioId]/inbox/read', access: 'client', path: (s) => `/api/studios/${s.id}/inbox/read`, body: () => ({ all: true }) },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/inbox/dismiss',
    access: 'artist',
    // the path makes the version the body names (path is built first)
    path: async (s) => {
      dismissedVersionId = (await reviewVersion(s)).versionId;
      return `/api/studios/${s.id}/inbox/dismiss`;
    },
    body: () => ({ versionId: dismissedVersionId }),
  },
  { method: 'GET', route: '/api/studios/[studioId]/compare', access: 'client', path: comparePair },
  { method: 'GET', route: '/api/me/preferences', access: 'signed-in', path: () => '/api/me/preferences' },
  { method: 'PATCH', route: '/api/me/preferences', access: 'signed-in', path: () => '/api/me/preferences', body: () => ({ dailyDigest: false }) },
);

// ── Exports and share links (issue 8) ────────────────────────────────────────────────────────────────────────────
// A pending export has a small GIF already in the store, so "complete" succeeds; a share link is made with a known
// token so "send" can prove it. Public /api/shared/* endpoints are listed as public (tested in share.test.ts).
import { shareLinks } from '../../src/lib/server/db/schema';

/** The smallest GIF we make in tests: GIF89a header + a trailer (enough for the magic-bytes check). */
export const TINY_GIF = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 1, 0, 1, 0, 0, 0, 0, 0x3b]);
const exportOpts = { first: 1001, last: 1010, width: 64, height: 36, look: 'surface', slate: true, burnIns: true, plate: false, loop: true };

/** A stored export of a baked version: 'ready' (listed) or 'pending' with its file already uploaded. */
export async function exportAsset(s: TestStudio, state: 'ready' | 'pending', versionId?: number): Promise<{ versionId: number; assetId: number }> {
  const vid = versionId ?? (await makeVersion(s, { baked: true })).versionId;
  const storageKey = `studios/${s.id}/versions/${vid}/exports/${unique('matrix')}.gif`;
  await putObject(storageKey, TINY_GIF, 'image/gif');
  const [res] = await db()
    .insert(tables.assets)
    .values({
      studioId: s.id,
      kind: 'export',
      storageKey,
      contentType: 'image/gif',
      byteSize: TINY_GIF.length,
      width: 64,
      height: 36,
      versionId: vid,
      format: 'gif',
      meta: { state, fileName: 'matrix.gif', declaredSize: TINY_GIF.length, options: exportOpts },
    });
  return { versionId: vid, assetId: Number(res.insertId) };
}

const linkTokens = new Map<number, string>();

/** A share link to a new baked version, with a token the caller can use. */
export async function shareLink(s: TestStudio, opts: { expiresAt?: Date; revoked?: boolean } = {}): Promise<{ linkId: number; token: string; versionId: number }> {
  const { versionId } = await makeVersion(s, { baked: true });
  const { newToken } = await import('../../src/lib/server/tokens');
  const token = newToken();
  const [res] = await db()
    .insert(shareLinks)
    .values({
      studioId: s.id,
      versionId,
      tokenHash: hashToken(token),
      expiresAt: opts.expiresAt ?? new Date(Date.now() + 7 * 86_400_000),
      revokedAt: opts.revoked ? new Date() : null,
    });
  const linkId = Number(res.insertId);
  linkTokens.set(s.id, token);
  return { linkId, token, versionId };
}

const inAWeek = () => new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10);

ENDPOINTS.push(
  {
    method: 'POST',
    route: '/api/versions/[versionId]/exports',
    access: 'artist',
    path: async (s) => `/api/versions/${(await makeVersion(s, { baked: true })).versionId}/exports`,
    body: () => ({ format: 'gif', byteSize: 2048, fileName: 'matrix.gif', options: exportOpts }),
  },
  { method: 'GET', route: '/api/versions/[versionId]/exports', access: 'artist', path: async (s) => `/api/versions/${(await exportAsset(s, 'ready')).versionId}/exports` },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/exports/[assetId]/complete',
    access: 'artist',
    path: async (s) => {
      const { versionId, assetId } = await exportAsset(s, 'pending');
      return `/api/versions/${versionId}/exports/${assetId}/complete`;
    },
  },
  { method: 'GET', route: '/api/exports/[assetId]', access: 'artist', path: async (s) => `/api/exports/${(await exportAsset(s, 'ready')).assetId}` },
  { method: 'GET', route: '/api/versions/[versionId]/share-links', access: 'supervisor', path: async (s) => `/api/versions/${(await shareLink(s)).versionId}/share-links` },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/share-links',
    access: 'supervisor',
    path: async (s) => `/api/versions/${(await makeVersion(s, { baked: true })).versionId}/share-links`,
    body: () => ({ expiresAt: inAWeek() }),
  },
  { method: 'POST', route: '/api/share-links/[linkId]/revoke', access: 'supervisor', path: async (s) => `/api/share-links/${(await shareLink(s)).linkId}/revoke` },
  {
    method: 'POST',
    route: '/api/share-links/[linkId]/send',
    access: 'supervisor',
    path: async (s) => `/api/share-links/${(await shareLink(s)).linkId}/send`,
    body: (s) => ({ token: linkTokens.get(s.id) ?? 'x', email: 'client@test.example' }),
  },
  { method: 'GET', route: '/api/shared/[token]', access: 'public', path: () => '/api/shared/x' },
  { method: 'POST', route: '/api/shared/[token]/unlock', access: 'public', path: () => '/api/shared/x/unlock' },
  { method: 'GET', route: '/api/shared/[token]/media', access: 'public', path: () => '/api/shared/x/media' },
  { method: 'POST', route: '/api/shared/[token]/notes', access: 'public', path: () => '/api/shared/x/notes' },
);

// ── Client sign-off (issue 13) ───────────────────────────────────────────────────────────────────────────────────
// The fixture is a baked version shared with clients in a show the test client may see, approved by us; for a client
// decision the studio has already asked for the sign-off. Only the client role may decide ('client-only').

/** An approved, shared version; `asked` also puts it in 'waiting' (the studio asked for the client's sign-off). */
export async function approvedVersion(s: TestStudio, asked = false) {
  const made = await makeVersion(s, { baked: true });
  await db().update(versions).set({ reviewState: 'approved', clientState: asked ? 'waiting' : 'not sent' }).where(eqId(made.versionId));
  return made;
}

ENDPOINTS.push(
  {
    method: 'POST',
    route: '/api/versions/[versionId]/client-review',
    access: 'supervisor',
    path: async (s) => `/api/versions/${(await approvedVersion(s)).versionId}/client-review`,
    body: () => ({ message: 'matrix' }),
  },
  {
    method: 'POST',
    route: '/api/versions/[versionId]/client-review/decide',
    access: 'client-only',
    path: async (s) => `/api/versions/${(await approvedVersion(s, true)).versionId}/client-review/decide`,
    body: () => ({ decision: 'sign-off' }),
  },
  { method: 'POST', route: '/api/shared/[token]/decision', access: 'public', path: () => '/api/shared/x/decision' },
);

// ── Prop pictures ────────────────────────────────────────────────────────────────────────────────────────────────
// Studio-wide cut-outs props are drawn as (src/lib/server/prop-pictures.ts): artists and up upload, list and choose
// them; a client sees one only through a version shared with them (GET /api/versions/:id/clip, share media).
import { encodePng } from '../../src/lib/server/png';

/** A pending prop picture whose file (an 8 × 8 RGBA PNG) has already reached the store. */
export async function pendingPicture(s: TestStudio): Promise<number> {
  const storageKey = `studios/${s.id}/pictures/${unique('matrix')}.png`;
  const png = encodePng(8, 8, new Uint8Array(8 * 8 * 4).fill(128), 4);
  await putObject(storageKey, png, 'image/png');
  const [res] = await db()
    .insert(tables.assets)
    .values({ studioId: s.id, kind: 'picture', storageKey, contentType: 'image/png', byteSize: png.length, meta: { state: 'pending', fileName: 'matrix.png', declaredSize: png.length } });
  return Number(res.insertId);
}

ENDPOINTS.push(
  { method: 'GET', route: '/api/studios/[studioId]/pictures', access: 'artist', path: (s) => `${lib(s)}/pictures` },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/pictures',
    access: 'artist',
    path: (s) => `${lib(s)}/pictures`,
    body: () => ({ fileName: 'can.png', contentType: 'image/png', byteSize: 2048 }),
  },
  {
    method: 'POST',
    route: '/api/studios/[studioId]/pictures/[assetId]/complete',
    access: 'artist',
    path: async (s) => `${lib(s)}/pictures/${await pendingPicture(s)}/complete`,
  },
);
