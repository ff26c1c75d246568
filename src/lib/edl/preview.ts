// Turns parsed edit lists and shot lists into a plan against a show's existing shots: which shots would be created,
// which change frame range (re-import of an updated edit), which stay as they are, and which lines have errors.
import { CODE_PATTERN } from '../library/schemas';
import { isPictureEvent, type EdlEvent, type EdlLineError, type ParsedEdl } from './cmx3600';
import type { ParsedCsv } from './csv';
import type { HandleConvention } from '../vocab';
import { cutInFrame } from '../library/handles';

export interface PlanOptions {
  codeFrom: 'clip' | 'pattern';
  /** e.g. "CNB_{n:03}0"; placeholders {n} (1, 2, 3… per shot), {event}, {reel}, {clip}; ":03" pads with zeros. */
  pattern?: string;
  /** Head handles in frames, before the cut in, and tail handles, after the cut out. */
  headHandles: number;
  tailHandles: number;
  /** The studio's first frame number (1001, common practice (no source)). */
  startFrame: number;
  /**
   * Where startFrame falls: 'head-handle' (the default) puts it on the first head-handle frame, so the cut in is
   * startFrame + head handles; 'cut-in' puts it on the cut in, with the head handles before it.
   */
  convention?: HandleConvention;
  /** Codes the user typed over the defaults in the preview, by the event's line number in the text. */
  codes?: Record<string, string>;
}

/** An edit event that makes no shot, with the reason in words. */
export interface SkippedEvent {
  line: number;
  event: string;
  reel: string;
  track: string;
  clipName: string | null;
  reason: string;
}

export interface PlannedShot {
  line: number;
  code: string;
  firstFrame: number;
  lastFrame: number;
  headHandles: number;
  tailHandles: number;
  description: string | null;
  /** Where it came from in the edit, when it came from one. */
  source?: ShotSource;
}

/** What a shot keeps from the edit: source timecode of the cut in, and where it sits in the cut. */
export interface ShotSource {
  event?: string;
  reel?: string | null;
  clipName?: string | null;
  /** Source timecode of the cut-in frame. */
  sourceIn?: string | null;
  recordIn?: string | null;
  recordOut?: string | null;
}

export interface ExistingShot {
  id: number;
  code: string;
  /** The shot is approved (its status, or an approved version): a range change needs an explicit tick. */
  approved?: boolean;
  firstFrame: number;
  lastFrame: number;
  headHandles: number;
  tailHandles: number;
}

/** A cut range (cut in, cut out) with its head and tail handles. */
export interface FrameRange {
  first: number;
  last: number;
  headHandles: number;
  tailHandles: number;
}

export interface ImportPreview {
  create: PlannedShot[];
  /** `approved`: the shot is approved; the change is applied only when the confirm ticks it (confirmApproved). */
  update: { id: number; line: number; code: string; from: FrameRange; to: FrameRange; source?: ShotSource; approved: boolean }[];
  unchanged: { id: number; line: number; code: string; firstFrame: number; lastFrame: number; headHandles: number; tailHandles: number; source?: ShotSource }[];
  errors: EdlLineError[];
  /** Events of the edit that make no shot (sound, black, zero length), with the reason. */
  skipped: SkippedEvent[];
}

/**
 * Plate and take suffixes stripped from a clip name for the default code, repeatedly from the end: a version
 * number (_v01, -v2), and the plate words plate, bg, fg, el, cln/clean, src (common practice (no source)).
 */
const CLIP_SUFFIX = /[\s_.-](?:v\d{1,4}|plate|plt|bg|fg|el\d*|cln|clean|src)$/i;

/**
 * The default shot code of a clip name: the file extension and common plate suffixes removed
 * (`PR_0010_plate_v01.exr` → `PR_0010`), and characters a shot code may not hold replaced with '_'.
 */
export function codeFromClipName(clip: string): string {
  let base = clip.trim().replace(/\.[A-Za-z][A-Za-z0-9]{1,4}$/, '');
  for (let guard = 0; guard < 8; guard++) {
    const next = base.replace(CLIP_SUFFIX, '');
    // Never strip the whole name away ("plate_v01" alone keeps "plate").
    if (next === base || !/[A-Za-z0-9]/.test(next)) break;
    base = next;
  }
  return base.replace(/[^A-Za-z0-9_.-]+/g, '_').replace(/^[^A-Za-z0-9]+/, '').replace(/[_.-]+$/, '');
}

/** Why an edit event makes no shot, or null for a picture event (see isPictureEvent). */
export function skipReason(ev: EdlEvent): string | null {
  if (isPictureEvent(ev)) return null;
  const reel = ev.reel.toUpperCase();
  if (!ev.track.toUpperCase().includes('V')) return `sound only (track ${ev.track}): no picture to make a shot of`;
  if (reel === 'BL' || reel === 'BLK' || reel === 'BLACK') return `black (reel ${ev.reel}): filler, not a shot`;
  return 'no length: its record out is not after its record in';
}

/** Fills a code pattern: "CNB_{n:03}0" with n = 2 → "CNB_0020". Unknown placeholders throw. */
export function fillPattern(pattern: string, values: { n: number; event?: string; reel?: string; clip?: string | null }): string {
  return pattern.replace(/\{(\w+)(?::(0?)(\d{1,2}))?\}/g, (_, name: string, zero: string, width: string) => {
    let v: string;
    if (name === 'n') v = String(values.n);
    else if (name === 'event') v = values.event ? String(Number(values.event)) : '';
    else if (name === 'reel') v = values.reel ?? '';
    else if (name === 'clip') v = values.clip ? codeFromClipName(values.clip) : '';
    else throw new Error(`unknown placeholder {${name}}: use {n}, {event}, {reel} or {clip}`);
    return width ? v.padStart(Number(width), zero === '0' ? '0' : ' ') : v;
  });
}

function rangeFromRecord(inFrame: number, outFrame: number, options: PlanOptions, headHandles: number) {
  // Record out is exclusive in an edit list: the cut holds out − in frames.
  const firstFrame = cutInFrame(options.convention, headHandles, options.startFrame);
  return { firstFrame, lastFrame: firstFrame + (outFrame - inFrame) - 1 };
}

/** Plans one shot per picture event of an edit list; the other events are listed as skipped with the reason. */
export function planFromEdl(parsed: ParsedEdl, options: PlanOptions): { shots: PlannedShot[]; errors: EdlLineError[]; skipped: SkippedEvent[] } {
  const shots: PlannedShot[] = [];
  const errors: EdlLineError[] = [...parsed.errors];
  let n = 0;
  const skipped: SkippedEvent[] = [];
  for (const ev of parsed.events) {
    const reason = skipReason(ev);
    if (reason) {
      skipped.push({ line: ev.line, event: ev.event, reel: ev.reel, track: ev.track, clipName: ev.clipName, reason });
      continue;
    }
    n++;
    const typed = options.codes?.[String(ev.line)]?.trim();
    let code: string;
    if (typed) {
      code = typed;
    } else if (options.codeFrom === 'pattern') {
      try {
        code = fillPattern(options.pattern ?? '', { n, event: ev.event, reel: ev.reel, clip: ev.clipName });
      } catch (e) {
        errors.push({ line: ev.line, message: (e as Error).message });
        continue;
      }
    } else {
      if (!ev.clipName) {
        errors.push({ line: ev.line, message: `event ${ev.event} has no clip name (* FROM CLIP NAME:): give a code pattern instead` });
        continue;
      }
      code = codeFromClipName(ev.clipName);
    }
    shots.push({
      line: ev.line,
      code,
      ...rangeFromRecord(ev.recordInFrame, ev.recordOutFrame, options, options.headHandles),
      headHandles: options.headHandles,
      tailHandles: options.tailHandles,
      description: null,
      source: { event: ev.event, reel: ev.reel, clipName: ev.clipName, sourceIn: ev.sourceIn, recordIn: ev.recordIn, recordOut: ev.recordOut },
    });
  }
  return { shots, errors, skipped };
}

/** Plans one shot per CSV row: frame rows keep their numbers; timecode rows are placed like edit events. */
export function planFromCsv(parsed: ParsedCsv, options: PlanOptions): { shots: PlannedShot[]; errors: EdlLineError[] } {
  const shots = parsed.rows.map((row): PlannedShot => {
    const headHandles = row.headHandles ?? options.headHandles;
    const tailHandles = row.tailHandles ?? options.tailHandles;
    const range =
      row.first !== undefined && row.last !== undefined
        ? { firstFrame: row.first, lastFrame: row.last }
        : rangeFromRecord(row.recordInFrame!, row.recordOutFrame!, options, headHandles);
    return {
      line: row.line,
      code: row.code,
      ...range,
      headHandles,
      tailHandles,
      description: row.description ?? null,
      ...(row.recordIn || row.sourceIn || row.reel || row.clipName
        ? { source: { recordIn: row.recordIn ?? null, recordOut: row.recordOut ?? null, sourceIn: row.sourceIn ?? null, reel: row.reel ?? null, clipName: row.clipName ?? null } }
        : {}),
    };
  });
  return { shots, errors: [...parsed.errors] };
}

/**
 * Compares planned shots with the show's shots by code: new codes are created, known codes with another frame
 * range or handles are updated, the rest are unchanged. Bad or repeated codes become errors on their line.
 */
export function previewImport(existing: ExistingShot[], planned: PlannedShot[], parseErrors: EdlLineError[] = [], maxCodeLength = 64, skipped: SkippedEvent[] = []): ImportPreview {
  const byCode = new Map(existing.map((s) => [s.code.toLowerCase(), s]));
  const seen = new Map<string, number>();
  const result: ImportPreview = { create: [], update: [], unchanged: [], errors: [...parseErrors], skipped };
  for (const shot of planned) {
    const key = shot.code.toLowerCase();
    if (!shot.code || !CODE_PATTERN.test(shot.code) || shot.code.length > maxCodeLength) {
      result.errors.push({
        line: shot.line,
        message: `"${shot.code}" is not a usable shot code (letters, digits, "_", "-", "."; ${maxCodeLength} characters at most)`,
      });
      continue;
    }
    if (seen.has(key)) {
      result.errors.push({ line: shot.line, message: `code ${shot.code} is already used on line ${seen.get(key)}` });
      continue;
    }
    seen.set(key, shot.line);
    if (shot.lastFrame > 9_999_999) {
      result.errors.push({ line: shot.line, message: `frame range ends past frame 9999999` });
      continue;
    }
    const old = byCode.get(key);
    if (!old) {
      result.create.push(shot);
    } else if (old.firstFrame !== shot.firstFrame || old.lastFrame !== shot.lastFrame || old.headHandles !== shot.headHandles || old.tailHandles !== shot.tailHandles) {
      result.update.push({
        id: old.id,
        line: shot.line,
        code: old.code,
        from: { first: old.firstFrame, last: old.lastFrame, headHandles: old.headHandles, tailHandles: old.tailHandles },
        to: { first: shot.firstFrame, last: shot.lastFrame, headHandles: shot.headHandles, tailHandles: shot.tailHandles },
        ...(shot.source ? { source: shot.source } : {}),
        approved: !!old.approved,
      });
    } else {
      result.unchanged.push({
        id: old.id,
        line: shot.line,
        code: old.code,
        firstFrame: old.firstFrame,
        lastFrame: old.lastFrame,
        headHandles: old.headHandles,
        tailHandles: old.tailHandles,
        ...(shot.source ? { source: shot.source } : {}),
      });
    }
  }
  result.errors.sort((a, b) => a.line - b.line);
  return result;
}
