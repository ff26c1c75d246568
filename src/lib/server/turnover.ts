// Turnover to editorial: the approved version of each shot of a show, at its original record timecode, as a CMX 3600
// EDL whose clip names are the MP4 exports' file names, zipped with those MP4s and a contents list.
import { strToU8 } from 'fflate';
import { and, desc, eq, inArray, isNull, type SQL } from 'drizzle-orm';
import { db } from './db';
import { assets, shots, versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { getObjectStream } from './storage';
import { zipStream } from './zip-stream';
import { getShowRow } from './library';
import { writeCmx3600 } from '../edl';
import { isTimecode, rateText, timecodeToFrames, type FrameRate } from '../timecode';
import { versionLabel } from '../vocab';
import { TURNOVER_APPROVAL_WORDS, type TurnoverApproval, type TurnoverItem, type TurnoverMissing, type TurnoverPlan } from '../library/turnover';

/** The version filter of each approval option: approved by us, or also signed off by the client (still current). */
const approvalFilter: Record<TurnoverApproval, SQL> = {
  internal: eq(versions.reviewState, 'approved'),
  client: and(eq(versions.reviewState, 'approved'), eq(versions.clientState, 'signed off'))!,
};

const safeName = (s: string) => s.replace(/[^A-Za-z0-9._-]+/g, '_');

/** Gives each file a name not yet used in the ZIP (adds _2, _3… before the extension). */
function uniqueName(name: string, used: Set<string>): string {
  let candidate = safeName(name);
  const dot = candidate.lastIndexOf('.');
  const [stem, ext] = dot > 0 ? [candidate.slice(0, dot), candidate.slice(dot)] : [candidate, ''];
  for (let n = 2; used.has(candidate.toLowerCase()); n++) candidate = `${stem}_${n}${ext}`;
  used.add(candidate.toLowerCase());
  return candidate;
}

type PlannedItem = TurnoverItem & { assetId: number };

interface Planned extends TurnoverPlan {
  items: PlannedItem[];
  storageKeys: Map<number, string>;
}

async function plan(access: StudioAccess, showId: number, approval: TurnoverApproval): Promise<Planned> {
  const show = await getShowRow(access, showId);
  const rate = show.frameRate as FrameRate;
  const shotRows = await db()
    .select()
    .from(shots)
    .where(and(eq(shots.showId, showId), eq(shots.studioId, access.studioId), isNull(shots.archivedAt)))
    .orderBy(shots.code);
  const approved = shotRows.length
    ? await db()
        .select({ id: versions.id, shotId: versions.shotId, number: versions.number })
        .from(versions)
        .where(and(eq(versions.studioId, access.studioId), inArray(versions.shotId, shotRows.map((s) => s.id)), approvalFilter[approval]))
        .orderBy(desc(versions.number))
    : [];
  const latest = new Map<number, { id: number; number: number }>();
  for (const v of approved) if (!latest.has(v.shotId)) latest.set(v.shotId, v);
  const versionIds = [...latest.values()].map((v) => v.id);
  const mp4s = versionIds.length
    ? await db()
        .select()
        .from(assets)
        .where(and(eq(assets.studioId, access.studioId), eq(assets.kind, 'export'), eq(assets.format, 'mp4'), inArray(assets.versionId, versionIds)))
        .orderBy(desc(assets.createdAt), desc(assets.id))
    : [];
  const newestMp4 = new Map<number, (typeof mp4s)[number]>();
  for (const a of mp4s) {
    const meta = (typeof a.meta === 'string' ? JSON.parse(a.meta) : a.meta) as { state?: string } | null;
    if (meta?.state === 'ready' && a.versionId !== null && !newestMp4.has(a.versionId)) newestMp4.set(a.versionId, a);
  }

  const items: PlannedItem[] = [];
  const missing: TurnoverMissing[] = [];
  const storageKeys = new Map<number, string>();
  const used = new Set<string>();
  const edlFileName = uniqueName(`${show.code}_turnover.edl`, used);
  used.add('contents.txt');
  let notApproved = 0;
  for (const shot of shotRows) {
    const v = latest.get(shot.id);
    if (!v) {
      notApproved++;
      continue;
    }
    const version = versionLabel(v.number);
    const skip = (reason: string) => missing.push({ shotId: shot.id, code: shot.code, version, reason });
    if (!shot.recordIn || !shot.recordOut) {
      skip('no record timecode: the shot did not come from an edit, so it has no place in the cut');
      continue;
    }
    if (!isTimecode(shot.recordIn, rate) || !isTimecode(shot.recordOut, rate) || timecodeToFrames(shot.recordOut, rate) <= timecodeToFrames(shot.recordIn, rate)) {
      skip(`record timecode ${shot.recordIn}–${shot.recordOut} cannot be read at the show's rate`);
      continue;
    }
    const mp4 = newestMp4.get(v.id);
    if (!mp4) {
      skip(`no MP4 export of ${version} yet: export one from the version's page`);
      continue;
    }
    const meta = (typeof mp4.meta === 'string' ? JSON.parse(mp4.meta) : mp4.meta) as { fileName?: string };
    const fileName = uniqueName(meta.fileName ?? `${shot.code}_${version}.mp4`, used);
    storageKeys.set(mp4.id, mp4.storageKey);
    items.push({
      shotId: shot.id,
      code: shot.code,
      version,
      versionId: v.id,
      recordIn: shot.recordIn,
      recordOut: shot.recordOut,
      sourceIn: shot.sourceTimecodeIn && isTimecode(shot.sourceTimecodeIn, rate) ? shot.sourceTimecodeIn : null,
      reel: shot.reel,
      fileName,
      byteSize: mp4.byteSize ?? 0,
      assetId: mp4.id,
    });
  }
  items.sort((a, b) => timecodeToFrames(a.recordIn, rate) - timecodeToFrames(b.recordIn, rate));
  return {
    show: { id: show.id, code: show.code, name: show.name, frameRate: show.frameRate },
    approval,
    edlFileName,
    zipFileName: `${safeName(show.code)}_turnover.zip`,
    items,
    missing,
    notApproved,
    storageKeys,
  };
}

/** What a turnover of the show would contain (producer/supervisor and owner). */
export async function turnoverPlan(access: StudioAccess, showId: number, approval: TurnoverApproval): Promise<TurnoverPlan> {
  const { storageKeys: _keys, ...rest } = await plan(access, showId, approval);
  return { ...rest, items: rest.items.map(({ assetId: _a, ...item }) => item) };
}

/** The EDL text of a plan: one cut event per item at its record timecode, clip name = the MP4's file name. */
export function turnoverEdl(p: TurnoverPlan): string {
  return writeCmx3600(
    `${p.show.code} turnover`,
    p.show.frameRate as FrameRate,
    p.items.map((i) => ({ reel: i.reel, sourceIn: i.sourceIn, recordIn: i.recordIn, recordOut: i.recordOut, clipName: i.fileName })),
  );
}

/** The contents list written into the ZIP beside the EDL. */
export function turnoverContents(p: TurnoverPlan): string {
  const lines = [
    `Turnover of show ${p.show.code} (${p.show.name}), timecode at ${rateText(p.show.frameRate)}`,
    `Versions: ${TURNOVER_APPROVAL_WORDS[p.approval]}`,
    '',
    `${p.edlFileName}  CMX 3600 edit list, one event per shot at its original record timecode; clip names are the MP4 files below`,
    ...p.items.map((i) => `${i.fileName}  ${i.code} ${i.version}, record ${i.recordIn}–${i.recordOut}`),
  ];
  if (p.missing.length) lines.push('', 'Approved but not included:', ...p.missing.map((m) => `${m.code} ${m.version ?? ''}: ${m.reason}`));
  lines.push('', 'Previs only: not an engineering plan for any practical effect.');
  return lines.join('\r\n') + '\r\n';
}

/**
 * The ZIP as a stream: the EDL, contents.txt and each MP4 (stored, not compressed again), each MP4 read from the store
 * only when the download reaches it. 409 (before any byte is sent) when nothing can go in it.
 */
export async function turnoverZip(access: StudioAccess, showId: number, approval: TurnoverApproval): Promise<{ fileName: string; stream: ReadableStream<Uint8Array> }> {
  const p = await plan(access, showId, approval);
  if (!p.items.length) {
    throw new HttpError('conflict', 'No approved shot of this show has an MP4 export and a record timecode yet: nothing to turn over', { approval: 'no shot passes this filter with an MP4 export' }, { missing: p.missing });
  }
  const stream = zipStream([
    { name: p.edlFileName, data: strToU8(turnoverEdl(p)) },
    { name: 'contents.txt', data: strToU8(turnoverContents(p)) },
    ...p.items.map((item) => ({ name: item.fileName, stored: true, data: () => getObjectStream(p.storageKeys.get(item.assetId)!) })),
  ]);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'show.turnover', targetType: 'show', targetId: showId, detail: { approval, shots: p.items.length, missing: p.missing.length } });
  return { fileName: p.zipFileName, stream };
}
