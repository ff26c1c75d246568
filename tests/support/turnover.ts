// Test support for turnovers: a 24 fps cut to import, versions in a review state, and stored MP4 exports.
import { db } from '../../src/lib/server/db';
import { assets, versions } from '../../src/lib/server/db/schema';
import { putObject } from '../../src/lib/server/storage';
import { unique, type TestStudio } from './app';

// Three events of a 24 fps cut (CMX 3600 layout, from memory); record out is exclusive.
export const QUAY_CUT = [
  'TITLE: QUAY CUT',
  'FCM: NON-DROP FRAME',
  '001  RL01     V     C        11:00:10:00 11:00:12:00 01:00:00:00 01:00:02:00',
  '* FROM CLIP NAME: QY_0100',
  '002  RL02     V     C        12:00:00:00 12:00:03:12 01:00:02:00 01:00:05:12',
  '* FROM CLIP NAME: QY_0200',
  '003  RL03     V     C        13:00:00:00 13:00:01:00 01:00:05:12 01:00:06:12',
  '* FROM CLIP NAME: QY_0300',
].join('\n');

/** Bytes that pass as an MP4 (an ISO BMFF 'ftyp' box first, ISO/IEC 14496-12) and are unique to the tag. */
export const fakeMp4 = (tag: string) => new Uint8Array([0, 0, 0, 16, ...new TextEncoder().encode('ftypisom'), 0, 0, 2, 0, ...new TextEncoder().encode(tag)]);

/** A baked version of the shot in the given review state. */
export async function addVersion(s: TestStudio, shotId: number, number: number, reviewState: 'approved' | 'submitted') {
  const [v] = await db().insert(versions).values({ studioId: s.id, shotId, number, scene: {}, sceneHash: unique('h'), reviewState, bakeState: 'baked' });
  return Number(v.insertId);
}

/** A ready MP4 export of the version, stored in the object store under the given file name. */
export async function addMp4(s: TestStudio, versionId: number, shotId: number, fileName: string, bytes: Uint8Array) {
  const storageKey = `studios/${s.id}/versions/${versionId}/exports/${unique('t')}.mp4`;
  await putObject(storageKey, bytes, 'video/mp4');
  await db().insert(assets).values({
    studioId: s.id,
    kind: 'export',
    storageKey,
    contentType: 'video/mp4',
    byteSize: bytes.length,
    width: 64,
    height: 36,
    versionId,
    shotId,
    format: 'mp4',
    meta: { state: 'ready', fileName, declaredSize: bytes.length, options: {} },
  });
}
