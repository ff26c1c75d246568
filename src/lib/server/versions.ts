// Versions of a shot: each save is a new, numbered, immutable version holding its scene document.
import { and, eq, inArray, sql, desc, type SQL } from 'drizzle-orm';
import { db } from './db';
import { shots, versions, assets, studios } from './db/schema';
import { HttpError } from './http';
import { clientVersionIds, isClient, type Access } from './access';
import { audit } from './audit';
import { supersedeOlderVersions } from './review';
import { clientSignOffView } from './client-signoff';
import { parseScene, sceneHash, type Scene } from '../scene';
import { checkBakeCost, DEFAULT_BAKE_COST_LIMIT } from '../scene/cost';

/** Validates a scene document; throws 400 naming each bad field as `scene.<path>`. */
export function validScene(doc: unknown): Scene {
  const parsed = parseScene(doc);
  if (parsed.ok) return parsed.scene;
  const fields: Record<string, string> = {};
  for (const e of parsed.errors) fields[`scene.${e.path}`] ??= e.message;
  const names = Object.keys(fields);
  throw new HttpError('validation_failed', names.length === 1 ? `${names[0]}: ${fields[names[0]]}` : `The scene has ${names.length} problems: ${names.slice(0, 5).join(', ')}`, fields);
}

/** The studio's bake cost limit in work units (studios.bake_cost_limit; null = DEFAULT_BAKE_COST_LIMIT). */
export async function bakeCostLimitOf(studioId: number): Promise<number> {
  const [row] = await db().select({ limit: studios.bakeCostLimit }).from(studios).where(eq(studios.id, studioId));
  return row?.limit ?? DEFAULT_BAKE_COST_LIMIT;
}

/** Throws 400 naming `scene.<field>` when the scene's bake cost estimate is over `limit` (see bakeCostLimitOf). */
export function requireBakeWithinLimit(scene: Scene, limit: number): void {
  const err = checkBakeCost(scene, limit);
  if (!err) return;
  const field = `scene.${err.field}`;
  throw new HttpError('validation_failed', `${field}: ${err.message}`, { [field]: err.message });
}

/**
 * Saves a scene as the shot's next version (numbers never reused; existing versions never changed).
 * Refuses (400) a scene whose bake would cost more than the studio's limit.
 */
export async function createVersion(shot: typeof shots.$inferSelect, authorId: string, scene: Scene, comment: string | null) {
  requireBakeWithinLimit(scene, await bakeCostLimitOf(shot.studioId));
  const hash = sceneHash(scene);
  const created = await db().transaction(async (tx) => {
    // Lock the shot row so two saves at once get consecutive numbers.
    const [locked] = await tx.select({ id: shots.id, plateAssetId: shots.plateAssetId }).from(shots).where(eq(shots.id, shot.id)).for('update');
    const [{ next }] = await tx
      .select({ next: sql<number>`COALESCE(MAX(${versions.number}), 0) + 1` })
      .from(versions)
      .where(eq(versions.shotId, shot.id));
    const [res] = await tx.insert(versions).values({
      studioId: shot.studioId,
      shotId: shot.id,
      number: Number(next),
      authorId,
      comment,
      scene,
      sceneHash: hash,
      plateAssetId: locked.plateAssetId,
    });
    // The older versions of the shot are superseded by this one (review events and audit in the same transaction).
    await supersedeOlderVersions(tx, shot, Number(res.insertId), authorId);
    return { id: Number(res.insertId), number: Number(next) };
  });
  await audit({ studioId: shot.studioId, actorId: authorId, action: 'version.create', targetType: 'version', targetId: created.id, detail: { shot: shot.code, number: created.number } });
  return { ...created, sceneHash: hash };
}

/** The public view of a version row. */
export function versionView(v: typeof versions.$inferSelect, withScene = true) {
  return {
    id: v.id,
    shotId: v.shotId,
    number: v.number,
    authorId: v.authorId,
    comment: v.comment,
    sceneHash: v.sceneHash,
    reviewState: v.reviewState,
    bakeState: v.bakeState,
    sharedWithClient: v.sharedWithClient,
    ...clientSignOffView(v),
    frozenAt: v.frozenAt,
    createdAt: v.createdAt,
    ...(withScene ? { scene: v.scene } : {}),
  };
}

/** The version's clip asset, if baked. */
export async function clipOf(v: typeof versions.$inferSelect) {
  if (!v.clipAssetId) return null;
  const [a] = await db().select().from(assets).where(eq(assets.id, v.clipAssetId));
  return a ?? null;
}

/** The shot's versions newest first, as `access` may see them (a client: only those the access policy shows it). */
export async function versionsOfShot(access: Access, shotId: number) {
  const where: SQL[] = [eq(versions.shotId, shotId), eq(versions.studioId, access.studioId)];
  if (isClient(access)) where.push(inArray(versions.id, clientVersionIds(access)));
  return db().select().from(versions).where(and(...where)).orderBy(desc(versions.number));
}

