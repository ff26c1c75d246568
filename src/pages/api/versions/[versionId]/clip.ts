// GET /api/versions/:versionId/clip → {clipUrl, statsUrl, bytes, meta, propPictures}: short-lived presigned URLs for the
// player (the clip is read with HTTP Range requests) and the pictures its props are drawn as. 409 until the version is baked.
import { endpoint, json, idParam, HttpError } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { clipOf } from '~/lib/server/versions';
import { presignGet } from '~/lib/server/storage';
import { healthOf } from '~/lib/sim/health';
import { propPicturesOf } from '~/lib/server/prop-pictures';

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  const clip = version.bakeState === 'baked' ? await clipOf(version) : null;
  if (!clip) throw new HttpError('conflict', 'This version is not baked yet', undefined, { bakeState: version.bakeState });
  const meta = (clip.meta ?? {}) as Record<string, unknown>;
  return json({
    clipUrl: await presignGet(clip.storageKey, 900),
    // Solver statistics are the studio's: a client gets the clip only.
    statsUrl: access.role !== 'client' && typeof meta.statsKey === 'string' ? await presignGet(meta.statsKey, 900) : null,
    bytes: clip.byteSize,
    // The bake's health verdict and the clip's meta are the studio's too.
    health: access.role !== 'client' ? healthOf(meta) : null,
    meta: access.role !== 'client' ? meta : {},
    // Whoever may see the version sees the pictures its props are drawn as (clients too: they are part of the look).
    propPictures: await propPicturesOf(version),
    expiresInSeconds: 900,
  });
});
