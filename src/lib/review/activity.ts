// A shot's activity in a studio's words: one sentence per audit entry ("v003 approved", "Plate width changed from
// 1920 to 2048 px"), shared by the shot page and its tests. The server picks the entries (src/lib/server/activity.ts).
import { versionLabel } from '../vocab';
import { fieldLabel } from '../scene/labels';

/** The audit actions a shot's activity shows (others, such as a superseded older version, are bookkeeping). */
export const ACTIVITY_ACTIONS = [
  'shot.create', 'shot.update', 'shot.workflow', 'shot.bulk_status', 'shot.scale', 'shot.archive', 'shot.unarchive',
  'plate.set', 'thumbnail.set',
  'version.create', 'version.submit', 'version.approve', 'version.return', 'version.share', 'version.unshare',
  'version.client.send', 'version.client.sign-off', 'version.client.ask-changes',
  'bake.reuse', 'bake.done', 'bake.failed', 'bake.cancel',
  'export.create', 'share.create', 'share.email', 'share.revoke',
  'note.client', 'share.note',
] as const;

export interface ActivityItem {
  action: string;
  actorName: string | null;
  detail: Record<string, unknown> | null;
  versionNumber?: number | null;
}

/** The words for a shot's field as the shot form labels it, and its unit after a value. */
const SHOT_FIELDS: Record<string, { label: string; unit?: string }> = {
  code: { label: 'Code' },
  description: { label: 'Description' },
  firstFrame: { label: 'Cut in' },
  lastFrame: { label: 'Cut out' },
  headHandles: { label: 'Head handles', unit: 'frames' },
  tailHandles: { label: 'Tail handles', unit: 'frames' },
  frameRate: { label: 'Frame rate' },
  plateWidth: { label: 'Plate width', unit: 'px' },
  plateHeight: { label: 'Plate height', unit: 'px' },
  pixelAspect: { label: 'Pixel aspect' },
  assigneeId: { label: 'Assignee' },
  dueDate: { label: 'Due date' },
  status: { label: 'Status' },
  sourceTimecodeIn: { label: 'Source timecode at cut in' },
  plateFirstFrame: { label: 'Plate’s first frame' },
  recordIn: { label: 'Record in' },
  recordOut: { label: 'Record out' },
  reel: { label: 'Reel' },
  clipName: { label: 'Clip name' },
};

const shown = (v: unknown, unit?: string): string => {
  if (v === null || v === undefined || v === '') return 'nothing';
  const s = typeof v === 'number' ? String(Number(v.toPrecision(6))) : typeof v === 'string' && /^\d{4}-\d{2}-\d{2}T/.test(v) ? v.slice(0, 10) : String(v);
  return unit ? `${s} ${unit}` : s;
};

/** "Plate width changed from 1920 to 2048 px" for one changed shot field ({from, to} in the audit detail). */
export function shotFieldChange(field: string, change: { from?: unknown; to?: unknown }): string {
  const f = SHOT_FIELDS[field] ?? { label: fieldLabel(field) };
  const from = change.from;
  const to = change.to;
  if (f.unit && typeof from === 'number' && typeof to === 'number') return `${f.label} changed from ${from} to ${to} ${f.unit}`;
  if (from === null || from === undefined || from === '') return `${f.label} set to ${shown(to, f.unit)}`;
  if (to === null || to === undefined || to === '') return `${f.label} cleared (was ${shown(from, f.unit)})`;
  return `${f.label} changed from ${shown(from)} to ${shown(to, f.unit)}`;
}

const obj = (v: unknown): Record<string, any> => (typeof v === 'object' && v !== null ? (v as Record<string, any>) : {});

/**
 * One entry as a sentence without its actor (the screen puts the name in front when there is one):
 * "saved v002", "v002 sent back for changes: “the crown is too tall”", "Plate width changed from 1920 to 2048 px".
 */
export function describeActivity(e: ActivityItem): string {
  const d = obj(e.detail);
  const v = e.versionNumber ? versionLabel(e.versionNumber) : 'a version';
  const quoted = (s: unknown) => (typeof s === 'string' && s.trim() ? `: “${s.trim().length > 160 ? `${s.trim().slice(0, 157)}…` : s.trim()}”` : '');
  switch (e.action) {
    case 'shot.create':
      return d.importedFrom === 'edl' ? 'created the shot from an edit list import' : d.importedFrom === 'csv' ? 'created the shot from a shot list import' : 'created the shot';
    case 'shot.workflow': {
      const parts: string[] = [];
      if (d.status) parts.push(`changed the status from ${d.status.from} to ${d.status.to}`);
      if (d.assigneeId) {
        const names = obj(d.assigneeName);
        parts.push(d.assigneeId.to ? `assigned the shot to ${names.to ?? 'someone'}${d.assigneeId.from ? ` (was ${names.from ?? 'someone else'})` : ''}` : `took the shot off ${names.from ?? 'its assignee'}`);
      }
      return parts.join(' and ') || 'changed the workflow';
    }
    case 'shot.bulk_status':
      return `set the status to ${d.status} (with other shots)`;
    case 'shot.update': {
      const lines = Object.entries(d).map(([k, c]) => shotFieldChange(k, obj(c)));
      return lines.length ? `changed the details: ${lines.join('; ')}` : 'changed the details';
    }
    case 'shot.scale':
      return `calibrated the scale: ${Number(d.metres)} m over ${Math.round(Number(d.pixels))} px`;
    case 'plate.set':
      return `set a new plate${d.width ? ` (${d.width}×${d.height})` : ''}`;
    case 'thumbnail.set':
      return 'set a new thumbnail';
    case 'shot.archive':
      return 'archived the shot';
    case 'shot.unarchive':
      return 'brought the shot back';
    case 'version.create':
      return `saved ${v}`;
    case 'version.submit':
      return `submitted ${v} for review${quoted(d.comment)}`;
    case 'version.approve':
      return `approved ${v}${quoted(d.comment)}`;
    case 'version.return':
      return `sent ${v} back for changes${quoted(d.comment)}`;
    case 'version.share':
      return `showed ${v} to the studio’s clients`;
    case 'version.unshare':
      return `stopped showing ${v} to the studio’s clients`;
    case 'version.client.send':
      return `asked the client to sign off ${v}`;
    case 'version.client.sign-off':
      return `signed off ${v} for the client${d.guestName ? ` (as ${d.guestName}, through a share link)` : ''}`;
    case 'version.client.ask-changes':
      return `asked for changes to ${v} for the client${d.guestName ? ` (as ${d.guestName}, through a share link)` : ''}${quoted(d.comment)}`;
    case 'bake.reuse':
      return `${v} baked (an identical scene’s bake was reused)`;
    case 'bake.done':
      return d.healthy === false ? `${v} baked, but the bake went wrong${typeof d.problem === 'string' ? `: ${d.problem}` : ''}` : `${v} baked`;
    case 'bake.failed':
      return `the bake of ${v} failed${typeof d.error === 'string' ? `: ${d.error.length > 160 ? `${d.error.slice(0, 157)}…` : d.error}` : ''}`;
    case 'bake.cancel':
      return `cancelled the bake of ${v}`;
    case 'export.create':
      return `exported ${v} as ${String(d.format ?? 'a file').toUpperCase()}`;
    case 'share.create':
      return `made a share link for ${v}`;
    case 'share.email':
      return `e-mailed the share link for ${v}${d.to ? ` to ${d.to}` : ''}`;
    case 'share.revoke':
      return `revoked a share link for ${v}`;
    case 'note.client':
      return `commented on ${v}${typeof d.frame === 'number' ? ` at frame ${d.frame}` : ''} (client account)`;
    case 'share.note':
      return `commented on ${v}${typeof d.frame === 'number' ? ` at frame ${d.frame}` : ''} (share link)`;
    default:
      return e.action.replace(/[._-]/g, ' ');
  }
}

/** The whole line with its actor: "Ana Reyes approved v002", "v002 baked (asked for by Ana Reyes)". */
export function activityLine(e: ActivityItem): string {
  const words = describeActivity(e);
  if (e.action === 'bake.done' || e.action === 'bake.failed') {
    const opening = /^v\d/.test(words) ? words : `${words[0].toUpperCase()}${words.slice(1)}`;
    return `${opening}${e.actorName ? ` (bake asked for by ${e.actorName})` : ''}`;
  }
  // a comment through a share link has no account behind it: the name the viewer gave stands in front
  const guest = e.action === 'share.note' && typeof e.detail?.guestName === 'string' ? e.detail.guestName : null;
  return `${e.actorName ?? guest ?? 'Someone'} ${words}`;
}
