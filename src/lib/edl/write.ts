// Writes a CMX 3600 edit decision list: a TITLE line, the FCM line, then one cut event per shot on the video track
// with its clip name on a "* FROM CLIP NAME:" comment. The layout is the one parseCmx3600 reads back.
import { framesPerDay, framesToTimecode, rateInfo, timecodeToFrames, type FrameRate } from '../timecode';

export interface EdlWriteEvent {
  /** Reel name; spaces become '_' (a reel is one token on the event line). Empty reads as "AX" (auxiliary source). */
  reel: string | null;
  /** Source timecode of the first frame of the cut (null reads as 00:00:00:00). */
  sourceIn: string | null;
  /** Record in/out as timecode labels at the rate; out is exclusive (CMX 3600). */
  recordIn: string;
  recordOut: string;
  clipName: string | null;
}

export class EdlWriteError extends Error {}

/** Reel token as written on the event line: one word, at most 32 characters here (the parser takes any token). */
export function reelToken(reel: string | null): string {
  const token = (reel ?? '').trim().replace(/\s+/g, '_').slice(0, 32);
  return token || 'AX';
}

/** Clip names go on one comment line: line breaks would end it, so they become spaces. */
const oneLine = (s: string) => s.replace(/[\r\n]+/g, ' ').trim();

/**
 * Returns CMX 3600 text for cut events at the rate (drop-frame rates write "FCM: DROP FRAME" and ';' labels).
 * Source out is source in plus the record duration. Events are numbered 001… in record order.
 * Throws EdlWriteError for an event whose record out is not after its record in, or a timecode the rate cannot read.
 */
export function writeCmx3600(title: string, rate: FrameRate, events: EdlWriteEvent[]): string {
  const info = rateInfo(rate);
  const lines = [`TITLE: ${oneLine(title).slice(0, 70)}`, `FCM: ${info.dropPerMinute > 0 ? 'DROP FRAME' : 'NON-DROP FRAME'}`];
  const placed = events
    .map((ev) => {
      const rin = timecodeToFrames(ev.recordIn, rate);
      const rout = timecodeToFrames(ev.recordOut, rate);
      if (rout <= rin) throw new EdlWriteError(`record out ${ev.recordOut} is not after record in ${ev.recordIn}`);
      return { ev, rin, rout };
    })
    .sort((a, b) => a.rin - b.rin);
  placed.forEach(({ ev, rin, rout }, i) => {
    const sin = ev.sourceIn ? timecodeToFrames(ev.sourceIn, rate) : 0;
    // Source timecode wraps at 24 hours as the SMPTE ST 12-1 counter does.
    const tc = (n: number) => framesToTimecode(n % framesPerDay(rate), rate);
    const num = String(i + 1).padStart(3, '0');
    lines.push(`${num}  ${reelToken(ev.reel).padEnd(8)} V     C        ${tc(sin)} ${tc(sin + rout - rin)} ${tc(rin)} ${tc(rout)}`);
    if (ev.clipName) lines.push(`* FROM CLIP NAME: ${oneLine(ev.clipName)}`);
  });
  return lines.join('\r\n') + '\r\n';
}
