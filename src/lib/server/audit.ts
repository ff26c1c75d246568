// The audit log: who did what, to what, when. Written beside every change that matters to a studio.
import { db } from './db';
import { auditLog } from './db/schema';

export async function audit(entry: {
  studioId: number | null;
  actorId: string | null;
  action: string;
  targetType?: string;
  targetId?: string | number;
  detail?: Record<string, unknown>;
}): Promise<void> {
  await db()
    .insert(auditLog)
    .values({
      studioId: entry.studioId,
      actorId: entry.actorId,
      action: entry.action,
      targetType: entry.targetType ?? null,
      targetId: entry.targetId === undefined ? null : String(entry.targetId),
      detail: entry.detail ?? null,
    });
}
