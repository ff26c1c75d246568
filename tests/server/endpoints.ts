// Every JSON endpoint with who may call it. The authorization matrix walks this list, and a test fails
// when a file under src/pages/api exports a method that is missing here: add new endpoints as you build them.
import type { Role } from '../../src/lib/vocab';
import type { TestStudio } from '../support/app';
import { makeUser, membershipId, unique } from '../support/app';
import { db } from '../../src/lib/server/db';
import { invitations, memberships } from '../../src/lib/server/db/schema';
import { hashToken } from '../../src/lib/server/tokens';

export type Access = 'public' | 'signed-in' | Role;

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
];
