// Demo studio for trying Tidemark: a fictional small studio, two shows, a handful of shots, one member per role.
// Idempotent: running it again leaves existing rows as they are.
import { and, eq } from 'drizzle-orm';
import { db } from './db';
import { assets, clientShows, memberships, shots, shows, studios, users, versions, type Role } from './db/schema';
import { hashPassword } from './password';
import { newUserId } from './tokens';
import { putObject } from './storage';
import { rooftopPoolPlate, harbourWallPlate, demoCanPicture } from './demo-plates';
import { createHash } from 'node:crypto';
import { makeStillThumbnail } from './thumbnails';
import { parseScene, sceneHash } from '../scene';
import { LIQUID_PRESETS } from '../scene/liquids';
import { enqueueBake } from '../bake/queue';

export const DEMO_STUDIO = { slug: 'saltmarsh', name: 'Saltmarsh Pictures' };

/** Demo sign-ins, printed by `npm start` and listed in the README. Demo only: not for real use. */
export const DEMO_USERS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'ines@saltmarsh.example', name: 'Ines Alvarado', role: 'owner', password: 'demo-owner-tide' },
  { email: 'tom@saltmarsh.example', name: 'Tom Okoro', role: 'supervisor', password: 'demo-super-tide' },
  { email: 'priya@saltmarsh.example', name: 'Priya Nair', role: 'artist', password: 'demo-artist-tide' },
  { email: 'dana@kestrelwell.example', name: 'Dana Whitfield', role: 'client', password: 'demo-client-tide' },
];

const DEMO_SHOWS = [
  {
    code: 'CNB',
    name: 'Kestrelwell Soda — "Cannonball"',
    description: '30-second commercial: a can of soda cannonballs into a rooftop pool.',
    frameRate: '25',
    shots: [
      { code: 'CNB_010', source: '03:12:40:00', description: 'Can tumbles off the diving board', first: 1001, last: 1048, status: 'blocking' as const },
      { code: 'CNB_020', source: '03:14:02:10', description: 'Impact: the can hits the pool, plunges, bobs up and floats', first: 1001, last: 1084, status: 'blocking' as const },
      { code: 'CNB_030', source: '03:20:18:05', description: 'Splash crown catches the sunset, slow motion', first: 1001, last: 1096, status: 'on hold' as const },
    ],
  },
  {
    code: 'LHK',
    name: 'The Gannet Hours — "Harbour Wall"',
    description: 'Music video: a storm wave slaps the harbour wall behind the band.',
    frameRate: '24',
    shots: [
      { code: 'LHK_0100', source: '11:04:10:00', description: 'Wide: first wave rolls in under the pier', first: 1001, last: 1072, status: 'blocking' as const },
      { code: 'LHK_0200', source: '11:06:33:12', description: 'Wave slaps the wall, spray over the singer', first: 1001, last: 1060, status: 'blocking' as const },
      { code: 'LHK_0300', source: '11:09:01:00', description: 'Red paint runs down the harbour steps', first: 1001, last: 1120, status: 'blocking' as const },
    ],
  },
];

/** The fictional soda's can colour, so the demo can reads as the product in the player and exports. */
const CAN_RED = '#D23C32';

/**
 * Blocking scenes of the demo shots (fictional). Tanks match the plates: the tank spans the plate's width.
 * `canPicture`: the studio's prop picture of the demo can (demoCanPicture), drawn as the can in the CNB shots.
 */
export function demoScene(code: string, fps: number, first: number, last: number, canPicture?: number): { scene: unknown; tankWidth: number } | null {
  const timing = { fps, startFrame: first, endFrame: last, substeps: 4 };
  if (code.startsWith('CNB_0')) {
    // A soda can (about 66 mm × 122 mm) falls from above the rooftop pool and lands in it. In the hero shot
    // (CNB_020) the can is free (an empty can, 400 kg/m³, lighter than water): let go with a small push and a
    // spin, it falls, splashes, plunges, bobs back up past the surface, rolls onto its side and floats there
    // (tests/sim/hero-demo.test.ts). The other shots puppet it with keys.
    const hero = code === 'CNB_020';
    // The hero can is dropped from the board, its bottom 0.29 m above the water (it hits at about 2.4 m/s).
    const canBottom = 0.74;
    const can = { type: 'polygon', points: [[0.767, canBottom], [0.833, canBottom], [0.833, canBottom + 0.122], [0.767, canBottom + 0.122]] };
    const look = canPicture ? { colour: CAN_RED, picture: canPicture } : { colour: CAN_RED };
    return {
      tankWidth: 1.6,
      scene: {
        version: 2,
        tank: { width: 1.6, height: 0.9, cellSize: 0.0125, sides: { left: true, right: true, bottom: true, top: false } },
        timing,
        physics: { seed: 11 },
        pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.45 }, velocity: [0, 0] }],
        props: [
          hero
            ? { id: 'can', ...look, shape: can, motion: 'free', density: 400, velocity: [0.15, 0], spin: 40 }
            : {
                id: 'can',
                ...look,
                shape: can,
                keys: [
                  { frame: first, dx: 0, dy: 0, angle: 0 },
                  { frame: first + 8, dx: 0.02, dy: -0.3, angle: 20 },
                  { frame: first + 16, dx: 0.04, dy: -0.55, angle: 35 },
                ],
              },
        ],
      },
    };
  }
  if (code === 'LHK_0200' || code === 'LHK_0100') {
    // A storm wave runs from the left and slaps the harbour wall on the right.
    return {
      tankWidth: 3.2,
      scene: {
        version: 1,
        tank: { width: 3.2, height: 1.8, cellSize: 0.025, sides: { left: true, right: true, bottom: true, top: false } },
        timing,
        physics: { seed: 4 },
        pours: [
          { id: 'swell', shape: { type: 'rect', x: 0, y: 0, width: 1.2, height: 0.9 }, velocity: [2.5, 0] },
          { id: 'harbour', shape: { type: 'rect', x: 1.2, y: 0, width: 1.6, height: 0.35 }, velocity: [0, 0] },
        ],
        walls: [{ id: 'harbour-wall', shape: { type: 'rect', x: 2.8, y: 0, width: 0.4, height: 1.2 } }],
      },
    };
  }
  if (code === 'LHK_0300') {
    // Red paint (the thick-paint preset) spills off the top step and runs down the harbour steps into the water.
    const paint = LIQUID_PRESETS.find((l) => l.key === 'thick-paint')!;
    return {
      tankWidth: 3.2,
      scene: {
        version: 2,
        liquids: [
          { id: 'water', name: 'Harbour water', colour: '#3A8FB7', viscosity: 1e-6 },
          { id: 'paint', name: 'Red paint', colour: paint.colour, viscosity: paint.viscosity },
        ],
        tank: { width: 3.2, height: 1.8, cellSize: 0.025, sides: { left: true, right: true, bottom: true, top: false } },
        timing,
        physics: { seed: 7 },
        pours: [{ id: 'harbour', liquid: 'water', shape: { type: 'rect', x: 1.6, y: 0, width: 1.6, height: 0.2 }, velocity: [0, 0] }],
        spouts: [
          { id: 'paint-spill', liquid: 'paint', shape: { type: 'circle', x: 0.3, y: 1.2, radius: 0.06 }, velocity: [0.8, -0.3], startFrame: first, endFrame: first + 36 },
        ],
        walls: [
          { id: 'step-1', shape: { type: 'rect', x: 0, y: 0, width: 0.8, height: 0.9 } },
          { id: 'step-2', shape: { type: 'rect', x: 0.8, y: 0, width: 0.4, height: 0.6 } },
          { id: 'step-3', shape: { type: 'rect', x: 1.2, y: 0, width: 0.4, height: 0.3 } },
        ],
      },
    };
  }
  return null;
}

/**
 * The studio's asset stored under `storageKey` (found again by its key, so seeding twice makes no second row), or a
 * new one made with `make` and put in the store.
 */
async function demoAsset(
  studioId: number,
  shotId: number | null,
  kind: 'plate' | 'thumbnail' | 'picture',
  storageKey: string,
  fileName: string,
  make: () => { bytes: Uint8Array; width: number; height: number },
): Promise<number> {
  const d = db();
  const [found] = await d
    .select({ id: assets.id })
    .from(assets)
    .where(and(eq(assets.studioId, studioId), eq(assets.storageKey, storageKey)));
  if (found) return found.id;
  const { bytes, width, height } = make();
  await putObject(storageKey, bytes, 'image/png');
  const [a] = await d.insert(assets).values({
    studioId,
    kind,
    storageKey,
    contentType: 'image/png',
    byteSize: bytes.length,
    width,
    height,
    shotId,
    format: 'png',
    sha256: createHash('sha256').update(bytes).digest('hex'),
    meta: { state: 'ready', demo: true, fileName, declaredSize: bytes.length },
  });
  return Number(a.insertId);
}

/**
 * Gives demo shots a painted plate, its thumbnail and a first version; queues one bake so the library has a baked
 * version. Shots keep a plate or thumbnail someone already set.
 */
async function seedVersions(studioId: number, artistId: string) {
  const d = db();
  const painted: Record<string, Uint8Array> = {};
  const paintedPlate = (name: string) => (painted[name] ??= name === 'rooftop-pool' ? rooftopPoolPlate() : harbourWallPlate());
  const rows = await d.select().from(shots).where(eq(shots.studioId, studioId));
  // The studio's prop picture of the demo can: the soda shots draw the can as it (the fill colour stays its rim).
  const canPicture = await demoAsset(studioId, null, 'picture', `studios/${studioId}/pictures/demo-kestrelwell-can.png`, 'kestrelwell-can.png', () => ({ bytes: demoCanPicture(), width: 132, height: 244 }));
  for (const shot of rows) {
    const fps = Number(shot.frameRate);
    const demo = demoScene(shot.code, fps, shot.firstFrame, shot.lastFrame, canPicture);
    if (!demo) continue;
    const plateName = shot.code.startsWith('CNB') ? 'rooftop-pool' : 'harbour-wall';
    const plateKey = `studios/${studioId}/plates/demo-${plateName}.png`;
    if (!shot.plateAssetId) {
      const plateId = await demoAsset(studioId, shot.id, 'plate', plateKey, `${plateName}.png`, () => ({ bytes: paintedPlate(plateName), width: 1920, height: 1080 }));
      await d
        .update(shots)
        .set({ plateAssetId: plateId, metresPerPixel: demo.tankWidth / 1920 })
        .where(eq(shots.id, shot.id));
      shot.plateAssetId = plateId;
    }
    if (!shot.thumbnailAssetId) {
      // Only a shot still on its painted plate gets the painted plate's thumbnail.
      const [plate] = await d.select({ storageKey: assets.storageKey }).from(assets).where(eq(assets.id, shot.plateAssetId));
      if (plate?.storageKey === plateKey) {
        const thumbKey = `studios/${studioId}/plates/demo-${plateName}-thumbnail.png`;
        const thumbId = await demoAsset(studioId, shot.id, 'thumbnail', thumbKey, `${plateName}-thumbnail.png`, () => {
          const made = makeStillThumbnail(paintedPlate(plateName), 'image/png');
          return { bytes: made.png, width: made.width, height: made.height };
        });
        await d.update(shots).set({ thumbnailAssetId: thumbId }).where(eq(shots.id, shot.id));
        shot.thumbnailAssetId = thumbId;
      }
    }
    const [existing] = await d.select({ id: versions.id }).from(versions).where(eq(versions.shotId, shot.id)).limit(1);
    if (existing) continue;
    const parsed = parseScene(demo.scene);
    if (!parsed.ok) throw new Error(`demo scene for ${shot.code} is invalid: ${JSON.stringify(parsed.errors)}`);
    const [v] = await d.insert(versions).values({
      studioId,
      shotId: shot.id,
      number: 1,
      authorId: artistId,
      comment: 'First blocking pass',
      scene: parsed.scene,
      sceneHash: sceneHash(parsed.scene),
      plateAssetId: shot.plateAssetId,
    });
    if (shot.code === 'LHK_0200') await enqueueBake(Number(v.insertId), studioId, artistId);
  }
}

/** Creates the demo studio and returns its id. */
export async function seedDemo(): Promise<number> {
  const d = db();
  await d.insert(studios).values(DEMO_STUDIO).onDuplicateKeyUpdate({ set: { slug: DEMO_STUDIO.slug } });
  const [studio] = await d.select().from(studios).where(eq(studios.slug, DEMO_STUDIO.slug));

  const userIds: Record<string, string> = {};
  for (const u of DEMO_USERS) {
    const [existing] = await d.select({ id: users.id }).from(users).where(eq(users.email, u.email));
    let id = existing?.id;
    if (!id) {
      id = newUserId();
      await d.insert(users).values({ id, email: u.email, name: u.name, passwordHash: await hashPassword(u.password) });
    }
    userIds[u.role] = id;
    await d
      .insert(memberships)
      .values({ studioId: studio.id, userId: id, role: u.role })
      .onDuplicateKeyUpdate({ set: { studioId: studio.id } });
  }

  for (const s of DEMO_SHOWS) {
    await d
      .insert(shows)
      .values({ studioId: studio.id, code: s.code, name: s.name, description: s.description, frameRate: s.frameRate })
      .onDuplicateKeyUpdate({ set: { code: s.code } });
    const [show] = await d.select().from(shows).where(and(eq(shows.studioId, studio.id), eq(shows.code, s.code)));
    for (const shot of s.shots) {
      await d
        .insert(shots)
        .values({
          studioId: studio.id,
          showId: show.id,
          code: shot.code,
          description: shot.description,
          firstFrame: shot.first,
          lastFrame: shot.last,
          headHandles: 8,
          tailHandles: 8,
          frameRate: s.frameRate,
          // Source timecode of the plate at the cut in (fictional camera timecode).
          sourceTimecodeIn: shot.source,
          status: shot.status,
          assigneeId: userIds.artist,
        })
        .onDuplicateKeyUpdate({ set: { code: shot.code } });
    }
  }
  // The demo client is from the soda brand: its membership names that brand's show only.
  const [cnb] = await d.select({ id: shows.id }).from(shows).where(and(eq(shows.studioId, studio.id), eq(shows.code, 'CNB')));
  if (cnb) await d.insert(clientShows).values({ studioId: studio.id, userId: userIds.client, showId: cnb.id }).onDuplicateKeyUpdate({ set: { showId: cnb.id } });
  await seedVersions(studio.id, userIds.artist);
  return studio.id;
}
