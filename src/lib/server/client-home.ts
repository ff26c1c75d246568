// What waits for a client on their home: the versions they may see (access.ts: shared with their shows, or sent to
// their address by share link) that ask something of them — a sign-off the studio asked for, or a version to watch
// that they have not decided on — newest first. Superseded versions are left out: a newer one took their place.
import { and, desc, eq, ne } from 'drizzle-orm';
import { db } from './db';
import { shots, shows, versions } from './db/schema';
import { clientVersionWhere, type Access } from './access';
import { versionLabel } from '../vocab';

export interface WaitingItem {
  versionId: number;
  label: string;
  shotCode: string;
  showName: string;
  kind: 'sign off' | 'watch';
  since: string;
}

export async function clientWaiting(access: Access): Promise<WaitingItem[]> {
  const rows = await db()
    .select({
      versionId: versions.id,
      number: versions.number,
      clientState: versions.clientState,
      clientSentAt: versions.clientSentAt,
      createdAt: versions.createdAt,
      shotCode: shots.code,
      showName: shows.name,
    })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .innerJoin(shows, eq(shows.id, shots.showId))
    .where(and(...clientVersionWhere(access), ne(versions.reviewState, 'superseded')))
    .orderBy(desc(versions.id))
    .limit(200);
  const items: WaitingItem[] = [];
  for (const r of rows) {
    if (r.clientState === 'signed off' || r.clientState === 'changes asked') continue;
    const kind = r.clientState === 'waiting' ? 'sign off' : 'watch';
    items.push({ versionId: r.versionId, label: versionLabel(r.number), shotCode: r.shotCode, showName: r.showName, kind, since: (r.clientSentAt ?? r.createdAt).toISOString() });
  }
  // sign-offs first: they are what the studio waits for
  return items.sort((a, b) => (a.kind === b.kind ? b.since.localeCompare(a.since) : a.kind === 'sign off' ? -1 : 1));
}
