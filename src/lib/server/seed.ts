// Demo studio for trying Tidemark: a fictional small studio, two shows, a handful of shots, one member per role.
// Idempotent: running it again leaves existing rows as they are.
import { and, eq } from 'drizzle-orm';
import { db } from './db';
import { memberships, shots, shows, studios, users, type Role } from './db/schema';
import { hashPassword } from './password';
import { newUserId } from './tokens';

export const DEMO_STUDIO = { slug: 'saltmarsh', name: 'Saltmarsh Pictures' };

/** Demo sign-ins, printed by `npm start` and listed in the README. Demo only: not for real use. */
export const DEMO_USERS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'ines@saltmarsh.example', name: 'Ines Alvarado', role: 'owner', password: 'demo-owner-tide' },
  { email: 'tom@saltmarsh.example', name: 'Tom Okoro', role: 'supervisor', password: 'demo-super-tide' },
  { email: 'priya@saltmarsh.example', name: 'Priya Nair', role: 'artist', password: 'demo-artist-tide' },
  { email: 'dana@briskcola.example', name: 'Dana Whitfield', role: 'client', password: 'demo-client-tide' },
];

const DEMO_SHOWS = [
  {
    code: 'CNB',
    name: 'Brisk Cola — "Cannonball"',
    description: '30-second commercial: a can of cola cannonballs into a rooftop pool.',
    frameRate: '25',
    shots: [
      { code: 'CNB_010', description: 'Can tumbles off the diving board', first: 1001, last: 1048, status: 'blocking' as const },
      { code: 'CNB_020', description: 'Impact: the can hits the pool surface', first: 1001, last: 1036, status: 'blocking' as const },
      { code: 'CNB_030', description: 'Splash crown catches the sunset, slow motion', first: 1001, last: 1096, status: 'on hold' as const },
    ],
  },
  {
    code: 'LHK',
    name: 'The Lamplighters — "Harbour Wall"',
    description: 'Music video: a storm wave slaps the harbour wall behind the band.',
    frameRate: '24',
    shots: [
      { code: 'LHK_0100', description: 'Wide: first wave rolls in under the pier', first: 1001, last: 1072, status: 'blocking' as const },
      { code: 'LHK_0200', description: 'Wave slaps the wall, spray over the singer', first: 1001, last: 1060, status: 'blocking' as const },
      { code: 'LHK_0300', description: 'Runoff pours down the steps', first: 1001, last: 1120, status: 'blocking' as const },
    ],
  },
];

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
          handles: 8,
          frameRate: s.frameRate,
          status: shot.status,
          assigneeId: userIds.artist,
        })
        .onDuplicateKeyUpdate({ set: { code: shot.code } });
    }
  }
  return studio.id;
}
