// The export's arithmetic and text layout, free of the DOM so Node tests can check it: which frames go out, at what
// size, with which GIF delays, and where every slate and burn-in text sits (what it says included).
import { rateInfo, rateText, sourceTimecodeAt } from '../timecode';
import { versionLabel } from '../vocab';
import { rangeWithHandles, type StoredHandles } from '../library/handles';

export const EXPORT_FORMATS = ['gif', 'mp4', 'zip', 'passes'] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

export const FORMAT_LABELS: Record<ExportFormat, string> = {
  gif: 'Animated GIF',
  mp4: 'MP4 (H.264)',
  zip: 'PNG frames (ZIP)',
  passes: 'Comp passes: splash with alpha + liquid matte (PNG ZIP)',
};
export const FORMAT_TYPES: Record<ExportFormat, string> = { gif: 'image/gif', mp4: 'video/mp4', zip: 'application/zip', passes: 'application/zip' };
/** The file name extension of each format (the comp passes are a ZIP too). */
export const FORMAT_EXTENSIONS: Record<ExportFormat, string> = { gif: 'gif', mp4: 'mp4', zip: 'zip', passes: 'zip' };

/** The caution shown wherever a preview could be taken for a plan (DEVELOPERS.md, Safety). */
export const CAUTION =
  'Previs only — not an engineering plan; plan practical water work with your licensed special-effects coordinator and local codes.';

export type RangeChoice =
  | { kind: 'shot' } // the shot's cut range
  | { kind: 'handles' } // the cut range with its head and tail handles
  | { kind: 'custom'; first: number; last: number };

export type SizeChoice = { kind: 'full' } | { kind: 'half' } | { kind: 'width'; width: number };

/** The shot's cut in and cut out with its head and tail handles (a tail never stored apart equals the head). */
export type ShotRange = StoredHandles & { firstFrame: number; lastFrame: number };

/** Returns the inclusive shot frames to export for a range choice; throws RangeError for an empty or reversed range. */
export function resolveRange(choice: RangeChoice, shot: ShotRange): { first: number; last: number } {
  const r =
    choice.kind === 'shot'
      ? { first: shot.firstFrame, last: shot.lastFrame }
      : choice.kind === 'handles'
        ? rangeWithHandles(shot)
        : { first: Math.round(choice.first), last: Math.round(choice.last) };
  if (!Number.isFinite(r.first) || !Number.isFinite(r.last) || r.last < r.first) throw new RangeError('The out frame must not be before the in frame');
  if (r.first < 0) throw new RangeError('Frames before 0 have no timecode');
  return r;
}

export const MAX_EXPORT_WIDTH = 3840;
export const MIN_EXPORT_WIDTH = 64;

const even = (v: number) => Math.max(2, 2 * Math.round(v / 2));

/**
 * Returns the output size in pixels for a size choice over a plate of the given size. Both sides are even
 * (H.264 yuv420p halves the chroma in each direction), the aspect follows the plate, and the width stays within
 * 64–3840.
 */
export function outputSize(choice: SizeChoice, plateWidth: number, plateHeight: number): { width: number; height: number } {
  const aspect = plateHeight / plateWidth;
  const wanted = choice.kind === 'full' ? plateWidth : choice.kind === 'half' ? plateWidth / 2 : choice.width;
  const width = even(Math.min(MAX_EXPORT_WIDTH, Math.max(MIN_EXPORT_WIDTH, wanted)));
  return { width, height: even(width * aspect) };
}

/**
 * GIF delays, in hundredths of a second, for `count` frames at `fps`. A GIF stores each frame's delay as a whole
 * number of centiseconds, so 24 fps (4.1667 cs a frame) cannot be exact. We round the *running* time instead of each
 * frame: delay_i = round(100·(i+1)/fps) − round(100·i/fps), which gives 4, 4, 5, 4, 4, 4, 4, 5, 4, 4, 4, 4, …
 * (24 frames last exactly 100 cs, i.e. one second, and no frame drifts more than half a centisecond from its time).
 * Exact rates such as 25 fps (4 cs) and 50 fps (2 cs) give equal delays.
 */
export function gifDelays(fps: number, count: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i++) out.push(Math.round((100 * (i + 1)) / fps) - Math.round((100 * i) / fps));
  return out;
}

/** How long the slate is held by default, in seconds: the same in every format (common practice (no source)). */
export const DEFAULT_SLATE_SECONDS = 1;

/**
 * Frames the slate is held for at a rate: the hold in seconds at the shot's rate, at least one frame. A GIF, an MP4
 * and a PNG sequence all repeat the slate picture this many times, so each holds it for the same time.
 */
export function slateFrameCount(fps: number, seconds: number = DEFAULT_SLATE_SECONDS): number {
  return Math.max(1, Math.round(seconds * fps));
}

/** The ffmpeg rate expression of a frame rate id: '24', '25', '24000/1001', '30000/1001', … */
export function ffmpegRate(rateId: string): string {
  const r = rateInfo(rateId);
  return Number.isInteger(r.fps) ? String(r.fps) : `${r.nominal * 1000}/1001`;
}

/**
 * The ffmpeg arguments: the PNG sequence at the shot's rate → H.264 yuv420p at the same rate, fast start; with a start
 * timecode, the MP4 carries it as its timecode track (QuickTime 'tmcd', which editing tools read to line the file up).
 */
export function mp4Args(rate: string, startTimecode?: string): string[] {
  // prettier-ignore
  return [
    '-framerate', rate,
    '-i', 'frame%05d.png',
    '-c:v', 'libx264',
    '-preset', 'veryfast',
    '-crf', '20',
    '-pix_fmt', 'yuv420p',
    '-r', rate,
    ...(startTimecode ? ['-timecode', startTimecode] : []),
    '-movflags', '+faststart',
    'out.mp4',
  ];
}

/**
 * The source timecode of an MP4's first picture, for its timecode track: the first frame's source timecode, or earlier
 * when a slate leads (a slate of n frames holds the n frames before the first, so every later picture's track
 * timecode equals the source timecode burnt into it).
 */
export function mp4StartTimecode(labels: ExportLabels, first: number, slate: boolean | number): string {
  const held = slate === true ? 1 : slate === false ? 0 : slate;
  return exportTimecode(labels, first - held);
}

/** What a slate and the burn-ins say. */
export interface ExportLabels {
  studioName: string;
  showName: string;
  showCode?: string;
  shotCode: string;
  versionNumber: number;
  artistName: string | null;
  /** The date printed on the slate (the export day), YYYY-MM-DD. */
  date: string;
  reviewState: string;
  /** Frame rate id, e.g. '24' or '29.97df'. */
  rateId: string;
  /** The shot's cut-in frame number and the source timecode of that frame (null reads as 00:00:00:00). */
  cutIn: number;
  sourceTimecodeIn: string | null;
  /** Where the shot sits in the cut (record in/out, out exclusive), when it came from an edit. */
  recordIn?: string | null;
  recordOut?: string | null;
  /** The PREVIS mark in the burn-ins' top-right corner; on unless set to false. */
  previsMark?: boolean;
}

/** Burnt into a corner of every frame, so a frame cut out of context still says what it is. */
export const PREVIS_MARK = 'PREVIS ONLY · NOT A RIG PLAN';

/** The source timecode of a shot frame for the slate and burn-ins (never the frame number read as timecode). */
export function exportTimecode(labels: ExportLabels, frame: number): string {
  return sourceTimecodeAt({ firstFrame: labels.cutIn, frameRate: labels.rateId, sourceTimecodeIn: labels.sourceTimecodeIn }, frame);
}

export { versionLabel };

/** A text placed on the frame: `x`,`y` in pixels (y is the text's baseline), `size` the font size in pixels. */
export interface TextItem {
  id: string;
  text: string;
  x: number;
  y: number;
  size: number;
  align: 'left' | 'right' | 'center';
  weight: 400 | 500 | 600 | 700;
  colour: string;
  /** Widest the text may be drawn; the drawing code shrinks (one line) or wraps (`wrap`) to fit. */
  maxWidth: number;
  wrap?: boolean;
}

export interface Band {
  x: number;
  y: number;
  width: number;
  height: number;
  colour: string;
}

export interface TextLayout {
  bands: Band[];
  texts: TextItem[];
}

export const BURN_IN_FONT = 'Space Grotesk';

/**
 * The burn-ins of one frame: a translucent band at the top (shot · version on the left, the PREVIS mark in the right
 * corner — the studio there instead when the mark is turned off) and at the bottom (the frame number on the left, the
 * studio in the middle, the frame's source timecode — the plate's own, from the shot's
 * source timecode at the cut in — on the right). Sizes scale with the frame height (a 3.4 % type, never under 10 px).
 */
export function burnInLayout(labels: ExportLabels, frame: number, width: number, height: number): TextLayout {
  const size = Math.max(10, Math.round(height * 0.034));
  const pad = Math.round(size * 0.6);
  const band = size + 2 * pad;
  const half = width / 2 - 2 * pad;
  const third = width / 3 - 2 * pad;
  const colour = '#f4f1ea';
  const bandColour = 'rgba(10, 22, 28, 0.55)';
  const top = pad + size * 0.8;
  const bottom = height - pad - size * 0.2;
  return {
    bands: [
      { x: 0, y: 0, width, height: band, colour: bandColour },
      { x: 0, y: height - band, width, height: band, colour: bandColour },
    ],
    texts: [
      { id: 'shot', text: `${labels.shotCode} · ${versionLabel(labels.versionNumber)}`, x: pad, y: top, size, align: 'left', weight: 600, colour, maxWidth: half },
      labels.previsMark === false
        ? { id: 'studio', text: labels.studioName, x: width - pad, y: top, size, align: 'right', weight: 500, colour, maxWidth: half }
        : { id: 'previs', text: PREVIS_MARK, x: width - pad, y: top, size, align: 'right', weight: 700, colour: '#ffd27a', maxWidth: half },
      { id: 'frame', text: `frame ${frame}`, x: pad, y: bottom, size, align: 'left', weight: 500, colour, maxWidth: third },
      ...(labels.previsMark === false ? [] : [{ id: 'studio', text: labels.studioName, x: width / 2, y: bottom, size, align: 'center' as const, weight: 500 as const, colour, maxWidth: third }]),
      { id: 'timecode', text: exportTimecode(labels, frame), x: width - pad, y: bottom, size, align: 'right', weight: 600, colour, maxWidth: third },
    ],
  };
}

/** The slate's rows, label and value, in the order they are printed. */
export function slateRows(labels: ExportLabels, first: number, last: number): { label: string; value: string }[] {
  rateInfo(labels.rateId); // throws for an unknown rate id
  const count = last - first + 1;
  return [
    { label: 'Studio', value: labels.studioName },
    { label: 'Show', value: labels.showCode ? `${labels.showName} (${labels.showCode})` : labels.showName },
    { label: 'Shot', value: labels.shotCode },
    { label: 'Version', value: versionLabel(labels.versionNumber) },
    { label: 'Artist', value: labels.artistName ?? '—' },
    { label: 'Date', value: labels.date },
    {
      label: 'Frames',
      value: `${first}–${last} · ${count} frame${count === 1 ? '' : 's'} · ${rateText(labels.rateId)} · source ${exportTimecode(labels, first)} – ${exportTimecode(labels, last)}`,
    },
    { label: 'Record', value: labels.recordIn && labels.recordOut ? `${labels.recordIn} – ${labels.recordOut} in the cut` : 'not from an edit' },
    { label: 'Review', value: labels.reviewState },
  ];
}

/**
 * Tidemark's slate: a deep-harbour card with a teal rule down the left edge, the shot and version large at the top,
 * a column of label/value rows, and the caution in an amber-edged strip along the bottom.
 */
export function slateLayout(labels: ExportLabels, first: number, last: number, width: number, height: number): TextLayout {
  // One layout unit = 1/29 of the height: title, nine rows and the caution strip fill it at any size.
  const unit = height / 29;
  const left = Math.round(width * 0.09);
  const right = width - Math.round(width * 0.06);
  const ink = '#f4f1ea';
  const soft = '#9fc3c4';
  const texts: TextItem[] = [];
  texts.push({ id: 'kicker', text: 'TIDEMARK PREVIS', x: left, y: unit * 3, size: Math.max(5, Math.round(unit * 0.8)), align: 'left', weight: 700, colour: '#3fb8b3', maxWidth: right - left });
  texts.push({
    id: 'title',
    text: `${labels.shotCode}  ${versionLabel(labels.versionNumber)}`,
    x: left,
    y: unit * 6,
    size: Math.round(unit * 2.4),
    align: 'left',
    weight: 700,
    colour: ink,
    maxWidth: right - left,
  });
  const rows = slateRows(labels, first, last);
  const rowSize = Math.max(5, Math.round(unit * 0.95));
  const labelWidth = Math.round(unit * 6);
  let y = unit * 9;
  for (const row of rows) {
    texts.push({ id: `label:${row.label}`, text: row.label.toUpperCase(), x: left, y, size: Math.max(5, Math.round(rowSize * 0.75)), align: 'left', weight: 600, colour: soft, maxWidth: labelWidth - unit });
    texts.push({ id: `value:${row.label}`, text: row.value, x: left + labelWidth, y, size: rowSize, align: 'left', weight: 500, colour: ink, maxWidth: right - left - labelWidth });
    y += unit * 1.7;
  }
  const stripTop = height - unit * 4.2;
  texts.push({ id: 'caution', text: CAUTION, x: left, y: stripTop + unit * 1.6, size: Math.max(5, Math.round(unit * 0.8)), align: 'left', weight: 500, colour: '#ffe3b0', maxWidth: right - left, wrap: true });
  return {
    bands: [
      { x: 0, y: 0, width, height, colour: '#0e2730' },
      { x: Math.round(width * 0.04), y: unit * 1.5, width: Math.max(3, Math.round(unit * 0.35)), height: height - unit * 6.5, colour: '#1f9e99' },
      { x: 0, y: stripTop, width, height: height - stripTop, colour: '#2b2a1e' },
      { x: 0, y: stripTop, width, height: Math.max(2, Math.round(unit * 0.15)), colour: '#e3a63b' },
    ],
    texts,
  };
}

/**
 * A file name for an export: SHOW_SHOT_v003_1001-1048.gif (only letters, digits, '-', '_' and '.'). A shot code that
 * already starts with the show's code (HW_0040 in show HW, as edit lists name shots) is not prefixed twice.
 */
export function exportFileName(labels: Pick<ExportLabels, 'showCode' | 'shotCode' | 'versionNumber'>, first: number, last: number, format: ExportFormat): string {
  const clean = (s: string) => s.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '');
  const show = labels.showCode ? clean(labels.showCode) : '';
  const shot = clean(labels.shotCode);
  const prefixed = show !== '' && (shot.toUpperCase() === show.toUpperCase() || shot.toUpperCase().startsWith(`${show.toUpperCase()}_`));
  const parts = [prefixed ? '' : show, shot, versionLabel(labels.versionNumber), `${first}-${last}`, format === 'passes' ? 'passes' : ''].filter(Boolean);
  return `${parts.join('_')}.${FORMAT_EXTENSIONS[format]}`;
}

/** The name of one PNG in a frame ZIP: SHOT_v003.1001.png (the slate is SHOT_v003.slate.png). */
export function zipEntryName(labels: Pick<ExportLabels, 'shotCode' | 'versionNumber'>, frame: number | 'slate', slateIndex = 0): string {
  const base = `${labels.shotCode.replace(/[^A-Za-z0-9_-]+/g, '-')}_${versionLabel(labels.versionNumber)}`;
  if (frame === 'slate') return slateIndex === 0 ? `${base}.0000_slate.png` : `${base}.0000_slate_${String(slateIndex + 1).padStart(3, '0')}.png`;
  return `${base}.${String(frame).padStart(4, '0')}.png`;
}

/**
 * Removes the zero bytes gif.js 0.2.0 leaves after the GIF trailer (its output buffer is sized one page too long,
 * PITFALLS.md): returns the bytes up to and including the trailer 0x3B. Returns the input when it ends otherwise.
 */
export function trimGifPadding(bytes: Uint8Array): Uint8Array {
  let end = bytes.length;
  while (end > 0 && bytes[end - 1] === 0) end--;
  return end > 0 && bytes[end - 1] === 0x3b ? bytes.subarray(0, end) : bytes;
}
