// Reads a CMX 3600 edit decision list (the plain-text layout most editing systems export) into events with
// record in/out as frame counts at the show's rate. Lines it cannot read are reported by line number, not thrown.
import { rateInfo, timecodeToFrames, TimecodeError, type FrameRate } from '../timecode';

export interface EdlEvent {
  /** 1-based line number of the event line in the text. */
  line: number;
  /** The event number as written (e.g. "003"). */
  event: string;
  reel: string;
  /** Track field: V, A, A2, AA, AA/V, B… */
  track: string;
  /** 'C' cut, 'D' dissolve, 'W' wipe, 'K' key. */
  transition: 'C' | 'D' | 'W' | 'K';
  /** Transition length in frames (dissolves and wipes), else 0. */
  transitionFrames: number;
  sourceIn: string;
  sourceOut: string;
  recordIn: string;
  recordOut: string;
  /** Record in/out as frame counts from 00:00:00:00 at the rate; out is exclusive (CMX 3600 convention). */
  recordInFrame: number;
  recordOutFrame: number;
  /** Whether the timecodes were read as drop-frame (from the FCM line in force). */
  dropFrame: boolean;
  /** From "* FROM CLIP NAME:" (or "* TO CLIP NAME:" for the incoming side of a dissolve), else null. */
  clipName: string | null;
  /** Other comment lines that followed the event, without the leading '*'. */
  comments: string[];
}

export interface EdlLineError {
  line: number;
  message: string;
}

export interface ParsedEdl {
  title: string | null;
  /** The first FCM line's mode, or null when there is none. */
  fcm: 'DROP FRAME' | 'NON-DROP FRAME' | null;
  events: EdlEvent[];
  errors: EdlLineError[];
}

const TC = /^\d{2}:\d{2}:\d{2}[:;.,]\d{2}$/;
const EVENT_START = /^\d{1,6}\s/;

/** Picks the rate that reads this EDL's timecodes: the show's rate, switched to drop-frame or not by the FCM line. */
function readingRate(showRate: FrameRate, dropFrame: boolean): FrameRate | null {
  const nominal = rateInfo(showRate).nominal;
  if (!dropFrame) {
    if (showRate === '29.97df') return '29.97';
    if (showRate === '59.94df') return '59.94';
    return showRate;
  }
  if (nominal === 30) return '29.97df';
  if (nominal === 60) return '59.94df';
  return null;
}

/**
 * Parses CMX 3600 text. `showRate` gives the frames per second the record timecodes count; the FCM line decides
 * drop-frame (a DROP FRAME list at a rate without drop-frame is reported on its FCM line and read as non-drop).
 */
export function parseCmx3600(text: string, showRate: FrameRate): ParsedEdl {
  rateInfo(showRate);
  const out: ParsedEdl = { title: null, fcm: null, events: [], errors: [] };
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/);
  let dropFrame = showRate.endsWith('df');
  /** The lines of the event number being read, to attach FROM/TO clip names. */
  let current: EdlEvent[] = [];

  lines.forEach((raw, index) => {
    const lineNo = index + 1;
    const line = raw.trim();
    const fail = (message: string) => out.errors.push({ line: lineNo, message });
    if (line === '') return;

    if (/^TITLE:/i.test(line)) {
      if (out.title === null) out.title = line.slice(6).trim();
      return;
    }
    if (/^FCM:/i.test(line)) {
      const mode = line.slice(4).trim().toUpperCase().replace(/\s+/g, ' ');
      if (mode !== 'DROP FRAME' && mode !== 'NON-DROP FRAME') {
        fail(`FCM must be DROP FRAME or NON-DROP FRAME, found "${line.slice(4).trim()}"`);
        return;
      }
      if (mode === 'DROP FRAME' && !readingRate(showRate, true)) {
        fail(`DROP FRAME timecode needs a 29.97 or 59.94 show rate; this show runs at ${rateInfo(showRate).label}: read as non-drop`);
        dropFrame = false;
      } else {
        dropFrame = mode === 'DROP FRAME';
      }
      out.fcm ??= mode;
      return;
    }
    if (line.startsWith('*')) {
      const comment = line.replace(/^\*\s*/, '');
      const clip = /^(FROM|TO) CLIP NAME:\s*(.*)$/i.exec(comment);
      if (clip && current.length) {
        const name = clip[2].trim() || null;
        // FROM names the first (outgoing) line of the event; TO names the incoming side of a dissolve or wipe.
        const target = clip[1].toUpperCase() === 'FROM' ? current[0] : current[current.length - 1];
        if (clip[1].toUpperCase() === 'FROM' || current.length > 1) target.clipName = name;
        else target.comments.push(comment);
        return;
      }
      if (current.length) current[current.length - 1].comments.push(comment);
      return;
    }
    // Motion effect, split-edit and transition-description lines that carry no record range of their own.
    if (/^(M2|SPLIT:|EFFECTS NAME IS|SWITCHER|GPI|AUD\b|>>>)/i.test(line)) return;

    if (!EVENT_START.test(line)) {
      fail(`cannot read this line: expected an event ("001  REEL  V  C  00:00:00:00 …"), a comment (*), TITLE: or FCM:`);
      return;
    }
    const tokens = line.split(/\s+/);
    const [event, reel, track, kindRaw] = tokens;
    if (!reel || !track || !kindRaw) {
      fail('event line is too short: expected event number, reel, track, transition and four timecodes');
      return;
    }
    let rest = tokens.slice(4);
    const kindUpper = kindRaw.toUpperCase();
    let transition: EdlEvent['transition'];
    if (kindUpper === 'C') transition = 'C';
    else if (kindUpper === 'D') transition = 'D';
    else if (/^W\d{3}$/.test(kindUpper)) transition = 'W';
    else if (/^K(B|O)?$/.test(kindUpper)) {
      transition = 'K';
      if (rest[0] === 'B' || rest[0] === 'O') rest = rest.slice(1);
    } else {
      fail(`unknown transition "${kindRaw}": expected C (cut), D (dissolve), W### (wipe) or K (key)`);
      return;
    }
    let transitionFrames = 0;
    if (rest.length === 5 && /^\d{1,4}$/.test(rest[0])) {
      transitionFrames = Number(rest[0]);
      rest = rest.slice(1);
    }
    if (transition !== 'C' && transition !== 'K' && transitionFrames === 0 && rest.length === 4) {
      fail(`a ${transition === 'D' ? 'dissolve' : 'wipe'} needs its length in frames before the timecodes`);
      return;
    }
    if (rest.length !== 4 || !rest.every((t) => TC.test(t))) {
      fail('expected four timecodes (source in, source out, record in, record out)');
      return;
    }
    const rate = readingRate(showRate, dropFrame) ?? readingRate(showRate, false)!;
    let recordInFrame: number;
    let recordOutFrame: number;
    try {
      for (const tc of rest) timecodeToFrames(tc, rate);
      recordInFrame = timecodeToFrames(rest[2], rate);
      recordOutFrame = timecodeToFrames(rest[3], rate);
    } catch (e) {
      fail(e instanceof TimecodeError ? `bad timecode: ${e.message}` : 'bad timecode');
      return;
    }
    if (recordOutFrame < recordInFrame) {
      fail(`record out ${rest[3]} is before record in ${rest[2]}`);
      return;
    }
    const ev: EdlEvent = {
      line: lineNo,
      event,
      reel,
      track: track.toUpperCase(),
      transition,
      transitionFrames,
      sourceIn: rest[0],
      sourceOut: rest[1],
      recordIn: rest[2],
      recordOut: rest[3],
      recordInFrame,
      recordOutFrame,
      dropFrame: rate.endsWith('df'),
      clipName: null,
      comments: [],
    };
    if (current.length && current[0].event === event) current.push(ev);
    else current = [ev];
    out.events.push(ev);
  });
  return out;
}

/** True for events that put a picture on the record timeline (video track, not black, not zero length). */
export function isPictureEvent(ev: EdlEvent): boolean {
  const reel = ev.reel.toUpperCase();
  return ev.track.includes('V') && reel !== 'BL' && reel !== 'BLK' && reel !== 'BLACK' && ev.recordOutFrame > ev.recordInFrame;
}
