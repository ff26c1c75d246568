// Shapes of the members and invitations API answers (dates arrive as ISO strings).
export type RoleName = 'owner' | 'supervisor' | 'artist' | 'client';

export interface Member {
  id: number;
  userId: string;
  name: string;
  email: string;
  role: RoleName;
  lastActiveAt: string | null;
  joinedAt: string;
  /** A client's shows (ids); null for the studio's own people. */
  showIds: number[] | null;
}

export interface MembersAnswer {
  members: Member[];
  you: { userId: string; role: RoleName };
}

export interface Invitation {
  id: number;
  email: string;
  role: RoleName;
  expiresAt: string;
  acceptedAt: string | null;
  revokedAt: string | null;
  createdAt: string;
}

export interface InvitationsAnswer {
  invitations: Invitation[];
}

/** What each role may do, in one line (shown under the invite form's role choice). */
export const ROLE_HELP: Record<RoleName, string> = {
  owner: 'Everything, including members, invitations and studio settings.',
  supervisor: 'Runs shows and shots, approves versions and shares them with clients.',
  artist: 'Blocks splashes, bakes them and submits versions for review.',
  client: 'Sees only the versions a supervisor shares with them, and leaves notes.',
};

export const ROLE_ORDER: RoleName[] = ['owner', 'supervisor', 'artist', 'client'];

/** A message for the top of the screen. */
export type Notice = { tone: 'error' | 'success'; text: string } | null;

/** TanStack Query keys for one studio's lists. */
export const keys = {
  members: (studioId: number) => ['studios', studioId, 'members'] as const,
  invitations: (studioId: number) => ['studios', studioId, 'invitations'] as const,
};
