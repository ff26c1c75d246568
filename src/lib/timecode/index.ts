// Frames ↔ SMPTE timecode (SMPTE ST 12-1), drop-frame included. Pure TypeScript: runs in the browser and on the server.
// Frame 0 is 00:00:00:00. Drop-frame timecode skips the *labels* ;00 and ;01 (29.97) or ;00–;03 (59.94) at the start
// of every minute except minutes 00, 10, 20, 30, 40 and 50; no frame is dropped, only numbers.

export const FRAME_RATES = ['23.976', '24', '25', '29.97df', '29.97', '30', '48', '50', '59.94df', '59.94', '60'] as const;
export type FrameRate = (typeof FRAME_RATES)[number];

export interface RateInfo {
  id: FrameRate;
  /** Frames per second as the label counts them (the timecode base: 24, 25, 30, 48, 50 or 60). */
  nominal: number;
  /** Real frames per second (30000/1001 for 29.97). */
  fps: number;
  /** Frame labels skipped at each minute that is not a multiple of ten (0 for non-drop). */
  dropPerMinute: number;
  /** Human label for menus, e.g. "29.97 DF". */
  label: string;
}

const info = (id: FrameRate, nominal: number, fps: number, dropPerMinute: number, label: string): RateInfo => ({ id, nominal, fps, dropPerMinute, label });

export const RATES: Record<FrameRate, RateInfo> = {
  '23.976': info('23.976', 24, 24000 / 1001, 0, '23.976'),
  '24': info('24', 24, 24, 0, '24'),
  '25': info('25', 25, 25, 0, '25'),
  '29.97df': info('29.97df', 30, 30000 / 1001, 2, '29.97 DF'),
  '29.97': info('29.97', 30, 30000 / 1001, 0, '29.97 NDF'),
  '30': info('30', 30, 30, 0, '30'),
  '48': info('48', 48, 48, 0, '48'),
  '50': info('50', 50, 50, 0, '50'),
  '59.94df': info('59.94df', 60, 60000 / 1001, 4, '59.94 DF'),
  '59.94': info('59.94', 60, 60000 / 1001, 0, '59.94 NDF'),
  '60': info('60', 60, 60, 0, '60'),
};

export class TimecodeError extends Error {
  override name = 'TimecodeError';
}

export function isFrameRate(value: unknown): value is FrameRate {
  return typeof value === 'string' && (FRAME_RATES as readonly string[]).includes(value);
}

/** Returns the rate's description, or throws TimecodeError for an unknown rate id. */
export function rateInfo(rate: FrameRate | string): RateInfo {
  if (!isFrameRate(rate)) throw new TimecodeError(`Unknown frame rate "${rate}": use one of ${FRAME_RATES.join(', ')}`);
  return RATES[rate];
}

/** Frames in 24 hours of timecode at this rate (the first frame number that has no label). */
export function framesPerDay(rate: FrameRate | string): number {
  const r = rateInfo(rate);
  return framesPerTenMinutes(r) * 6 * 24;
}

function framesPerTenMinutes(r: RateInfo): number {
  return r.nominal * 600 - r.dropPerMinute * 9;
}

/**
 * Returns the SMPTE timecode label of a frame count from 00:00:00:00, e.g. 1800 at 29.97df → "00:01:00;02".
 * Drop-frame labels use ';' before the frames field. Throws TimecodeError for negative, fractional or ≥ 24 h input.
 */
export function framesToTimecode(frames: number, rate: FrameRate | string): string {
  const r = rateInfo(rate);
  if (!Number.isInteger(frames)) throw new TimecodeError(`Frame count must be a whole number, got ${frames}`);
  if (frames < 0) throw new TimecodeError(`Frame count must not be negative, got ${frames}`);
  if (frames >= framesPerDay(rate)) throw new TimecodeError(`Frame ${frames} is past 24 hours of timecode at ${r.label}`);
  let n = frames;
  if (r.dropPerMinute > 0) {
    // SMPTE ST 12-1 drop-frame: per ten minutes, 9 of the 10 minutes lose `drop` labels.
    const drop = r.dropPerMinute;
    const perTen = framesPerTenMinutes(r);
    const perMinute = r.nominal * 60 - drop;
    const tens = Math.floor(n / perTen);
    const rest = n % perTen;
    n += 9 * drop * tens + (rest >= drop ? drop * Math.floor((rest - drop) / perMinute) : 0);
  }
  const ff = n % r.nominal;
  const totalSeconds = Math.floor(n / r.nominal);
  const ss = totalSeconds % 60;
  const mm = Math.floor(totalSeconds / 60) % 60;
  const hh = Math.floor(totalSeconds / 3600);
  const two = (v: number) => String(v).padStart(2, '0');
  return `${two(hh)}:${two(mm)}:${two(ss)}${r.dropPerMinute ? ';' : ':'}${two(ff)}`;
}

const TC_PATTERN = /^(\d{2}):(\d{2}):(\d{2})([:;.,])(\d{2})$/;

/**
 * Returns the frame count (from 00:00:00:00) of a timecode label at the rate. Accepts ':' or ';' (or '.'/',')
 * before the frames field; the rate, not the separator, decides drop-frame. Throws TimecodeError for a malformed
 * label, fields out of range, or a label that drop-frame skips (e.g. 00:01:00;00 at 29.97df).
 */
export function timecodeToFrames(timecode: string, rate: FrameRate | string): number {
  const r = rateInfo(rate);
  const m = TC_PATTERN.exec(String(timecode).trim());
  if (!m) throw new TimecodeError(`"${timecode}" is not a timecode (HH:MM:SS:FF)`);
  const [hh, mm, ss, ff] = [m[1], m[2], m[3], m[5]].map(Number);
  if (hh > 23) throw new TimecodeError(`"${timecode}": hours must be 00–23`);
  if (mm > 59) throw new TimecodeError(`"${timecode}": minutes must be 00–59`);
  if (ss > 59) throw new TimecodeError(`"${timecode}": seconds must be 00–59`);
  if (ff >= r.nominal) throw new TimecodeError(`"${timecode}": frames must be 00–${String(r.nominal - 1).padStart(2, '0')} at ${r.label}`);
  if (r.dropPerMinute > 0 && ss === 0 && ff < r.dropPerMinute && mm % 10 !== 0) {
    throw new TimecodeError(`"${timecode}" does not exist in drop-frame timecode (labels ;00–;${String(r.dropPerMinute - 1).padStart(2, '0')} are skipped at this minute)`);
  }
  const totalMinutes = hh * 60 + mm;
  const labels = (totalMinutes * 60 + ss) * r.nominal + ff;
  // Subtract the labels drop-frame skipped in every earlier minute that is not a multiple of ten.
  return labels - r.dropPerMinute * (totalMinutes - Math.floor(totalMinutes / 10));
}

/** True when the string is a well-formed, existing timecode at the rate. */
export function isTimecode(timecode: string, rate: FrameRate | string): boolean {
  try {
    timecodeToFrames(timecode, rate);
    return true;
  } catch {
    return false;
  }
}

/** Returns a frame count as seconds of real time at the rate (29.97 counts 30000/1001 frames per second). */
export function framesToSeconds(frames: number, rate: FrameRate | string): number {
  return frames / rateInfo(rate).fps;
}

/** What a shot needs to label its frames with the plate's own (source) timecode. */
export interface SourceTimecodeShot {
  /** Shot frame number of the cut in (the first frame of the cut). */
  firstFrame: number;
  frameRate: FrameRate | string;
  /** Source timecode of the cut-in frame (from the edit's source in, or typed in); null/empty reads as 00:00:00:00. */
  sourceTimecodeIn?: string | null;
}

/**
 * Returns the source timecode of a shot frame: the shot's source timecode at the cut in plus the frame's offset from
 * the cut in (handle frames before the cut count backwards). Counting is in frames, so drop-frame labels follow
 * SMPTE ST 12-1; timecode wraps at 24 hours as the standard's counter does. Throws TimecodeError for a malformed
 * source timecode or a non-integer frame.
 */
export function sourceTimecodeAt(shot: SourceTimecodeShot, frame: number): string {
  if (!Number.isInteger(frame)) throw new TimecodeError(`Frame number must be a whole number, got ${frame}`);
  const start = shot.sourceTimecodeIn ? timecodeToFrames(shot.sourceTimecodeIn, shot.frameRate) : 0;
  const day = framesPerDay(shot.frameRate);
  const n = (((start + frame - shot.firstFrame) % day) + day) % day;
  return framesToTimecode(n, shot.frameRate);
}

/** sourceTimecodeAt for display: `fallback` ('' unless given) when the shot's source timecode or rate cannot label the frame. */
export function sourceTimecodeLabel(shot: SourceTimecodeShot, frame: number, fallback = ''): string {
  try {
    return sourceTimecodeAt(shot, frame);
  } catch {
    return fallback;
  }
}

/** A frame as people read it, its number paired with its source timecode: "1009 · 01:00:10:00" (the number alone when the shot's source timecode cannot label it). */
export function frameWithTimecode(shot: SourceTimecodeShot, frame: number): string {
  const tc = sourceTimecodeLabel(shot, frame);
  return tc ? `${frame} · ${tc}` : String(frame);
}

/** A rate as people read it: "24 fps", "25 fps", but "29.97 DF" / "59.94 NDF" (the counting mode says it is a rate). */
export function rateText(rate: FrameRate | string): string {
  if (!isFrameRate(rate)) return String(rate);
  const label = RATES[rate].label;
  return /DF$/.test(label) ? label : `${label} fps`;
}
