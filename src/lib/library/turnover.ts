// Turnover to editorial: which approval a turnover takes, in our own words, and the shape of its plan. Shared by
// the API route (zod on the query) and the show page's panel; the server maps each option to its version filter.
import { z } from 'zod';

export const TURNOVER_APPROVALS = ['internal', 'client'] as const;
export type TurnoverApproval = (typeof TURNOVER_APPROVALS)[number];

export const TURNOVER_APPROVAL_WORDS: Record<TurnoverApproval, string> = {
  internal: 'Approved by us (supervisor)',
  client: 'Client signed off (and approved by us)',
};

export const turnoverQuery = z.object({
  approval: z.enum(TURNOVER_APPROVALS, { errorMap: () => ({ message: `must be one of ${TURNOVER_APPROVALS.join(', ')}` }) }).default('internal'),
  format: z.enum(['json', 'zip'], { errorMap: () => ({ message: 'must be json or zip' }) }).default('json'),
});

export interface TurnoverItem {
  shotId: number;
  code: string;
  version: string;
  versionId: number;
  recordIn: string;
  recordOut: string;
  sourceIn: string | null;
  reel: string | null;
  /** The MP4's name inside the ZIP; the EDL event's clip name. */
  fileName: string;
  byteSize: number;
}

export interface TurnoverMissing {
  shotId: number;
  code: string;
  version: string | null;
  reason: string;
}

export interface TurnoverPlan {
  show: { id: number; code: string; name: string; frameRate: string };
  approval: TurnoverApproval;
  edlFileName: string;
  zipFileName: string;
  items: TurnoverItem[];
  /** Approved shots that cannot go in the turnover, each with the reason (no MP4 export yet, no record timecode). */
  missing: TurnoverMissing[];
  /** Active shots with no version passing the approval filter. */
  notApproved: number;
}
