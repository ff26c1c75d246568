// The export's pure parts: which frames, what size, GIF delays at 24 fps, the gif.js padding fix, burn-in text and
// its SMPTE timecode for the first and last frames, the slate's rows and caution, file names, the ffmpeg command.
import { describe, it, expect } from 'vitest';
import {
  CAUTION,
  PREVIS_MARK,
  burnInLayout,
  exportFileName,
  ffmpegRate,
  gifDelays,
  mp4Args,
  mp4StartTimecode,
  slateFrameCount,
  DEFAULT_SLATE_SECONDS,
  outputSize,
  resolveRange,
  slateLayout,
  slateRows,
  trimGifPadding,
  zipEntryName,
  type ExportLabels,
} from '../../src/lib/export/layout';
import { ProgressTracker } from '../../src/lib/export/progress';

const labels: ExportLabels = {
  studioName: 'Gull Point Pictures',
  showName: 'Low Tide',
  showCode: 'LT',
  shotCode: 'LT_010',
  versionNumber: 3,
  artistName: 'Ana Ruiz',
  date: '2025-06-01',
  reviewState: 'submitted',
  rateId: '24',
  cutIn: 1009,
  sourceTimecodeIn: '01:00:10:00',
  recordIn: '01:00:00:00',
  recordOut: '01:00:02:00',
};

describe('GIF delays (hundredths of a second)', () => {
  it('24 fps: running time rounded to the centisecond → 4,4,5,4,4,4 …, 24 frames = exactly 100 cs', () => {
    const d = gifDelays(24, 24);
    expect(d.slice(0, 6)).toEqual([4, 4, 5, 4, 4, 4]);
    expect(d.reduce((a, b) => a + b, 0)).toBe(100);
    expect(new Set(d)).toEqual(new Set([4, 5]));
    // no frame is more than half a centisecond off its true start time (i·100/24 cs)
    let t = 0;
    d.forEach((cs, i) => {
      expect(Math.abs(t - (i * 100) / 24)).toBeLessThanOrEqual(0.5);
      t += cs;
    });
  });
  it('25 and 50 fps are exact (4 and 2 cs)', () => {
    expect(new Set(gifDelays(25, 50))).toEqual(new Set([4]));
    expect(new Set(gifDelays(50, 50))).toEqual(new Set([2]));
  });
});

describe('gif.js trailing bytes', () => {
  it('cuts the zero bytes after the 0x3B trailer, and leaves other data alone', () => {
    const gif = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 5, 0, 0x3b]);
    const padded = new Uint8Array(gif.length + 3000);
    padded.set(gif);
    expect(Array.from(trimGifPadding(padded))).toEqual(Array.from(gif));
    expect(trimGifPadding(gif).length).toBe(gif.length);
    const notGif = new Uint8Array([1, 2, 3, 0, 0]);
    expect(trimGifPadding(notGif).length).toBe(5);
  });
});

describe('frame range and size', () => {
  const shot = { firstFrame: 1001, lastFrame: 1048, headHandles: 8, tailHandles: 12 };
  it('resolves the cut range, head and tail handles, and in/out', () => {
    expect(resolveRange({ kind: 'shot' }, shot)).toEqual({ first: 1001, last: 1048 });
    expect(resolveRange({ kind: 'handles' }, shot)).toEqual({ first: 993, last: 1060 });
    // A tail never stored apart (null) counts as many frames as the head.
    expect(resolveRange({ kind: 'handles' }, { ...shot, tailHandles: null })).toEqual({ first: 993, last: 1056 });
    expect(resolveRange({ kind: 'custom', first: 1010, last: 1020 }, shot)).toEqual({ first: 1010, last: 1020 });
    expect(() => resolveRange({ kind: 'custom', first: 1020, last: 1010 }, shot)).toThrow(/before/);
  });
  it('keeps both sides even (yuv420p) and the plate aspect', () => {
    expect(outputSize({ kind: 'full' }, 1920, 1080)).toEqual({ width: 1920, height: 1080 });
    expect(outputSize({ kind: 'half' }, 1920, 1080)).toEqual({ width: 960, height: 540 });
    const odd = outputSize({ kind: 'width', width: 333 }, 2048, 858);
    expect(odd.width % 2).toBe(0);
    expect(odd.height % 2).toBe(0);
    expect(Math.abs(odd.width / odd.height - 2048 / 858)).toBeLessThan(0.02);
    expect(outputSize({ kind: 'width', width: 10 }, 1920, 1080).width).toBe(64);
    expect(outputSize({ kind: 'width', width: 99999 }, 1920, 1080).width).toBe(3840);
  });
});

describe('burn-ins', () => {
  it('print shot · version, studio, frame number and the SOURCE timecode of the exported first and last frames', () => {
    const df = { rateId: '29.97df', cutIn: 1001, sourceTimecodeIn: '00:00:59;28' };
    for (const [frame, over, tc] of [
      [1001, {}, '01:00:09:16'], // first frame with 8 head handles: 8 frames before the source in (SMPTE ST 12-1, 24 non-drop)
      [1009, {}, '01:00:10:00'], // cut in = the EDL's source in
      [1056, {}, '01:00:11:23'], // cut out: 47 frames after the cut in at 24
      [1001, df, '00:00:59;28'],
      [1003, df, '00:01:00;02'], // ;00 and ;01 skipped at minute 1 (SMPTE ST 12-1 drop-frame rule)
    ] as const) {
      const l = burnInLayout({ ...labels, ...over }, frame, 960, 540);
      const byId = Object.fromEntries(l.texts.map((t) => [t.id, t]));
      expect(byId.timecode.text).toBe(tc);
      expect(byId.frame.text).toBe(`frame ${frame}`);
      expect(byId.shot.text).toBe('LT_010 · v003');
      expect(byId.studio.text).toBe('Gull Point Pictures');
      expect(byId.previs.text).toBe(PREVIS_MARK);
    }
    // Not the frame number read as timecode (frame 1001 at 24 would be 00:00:41:17).
    expect(burnInLayout(labels, 1001, 960, 540).texts.find((t) => t.id === 'timecode')!.text).not.toBe('00:00:41:17');
  });
  it('carry the PREVIS mark in the top-right corner by default, and only when it is not turned off', () => {
    const on = burnInLayout(labels, 1001, 960, 540).texts.find((t) => t.id === 'previs')!;
    expect(on.text).toMatch(/PREVIS/);
    expect(on.align).toBe('right');
    expect(on.x).toBeGreaterThan(960 * 0.9); // right edge
    expect(on.y).toBeLessThan(540 * 0.1); // top band
    const off = burnInLayout({ ...labels, previsMark: false }, 1001, 960, 540).texts;
    expect(off.find((t) => t.id === 'previs')).toBeUndefined();
    expect(off.find((t) => t.id === 'studio')!.text).toBe('Gull Point Pictures');
  });
  it('stays inside the frame, in bands at the top and bottom', () => {
    const l = burnInLayout(labels, 1001, 480, 270);
    for (const t of l.texts) {
      expect(t.y).toBeGreaterThan(0);
      expect(t.y).toBeLessThan(270);
      expect(t.size).toBeGreaterThanOrEqual(10);
    }
    expect(l.bands[0].y).toBe(0);
    expect(l.bands[1].y + l.bands[1].height).toBe(270);
  });
});

describe('slate', () => {
  it('lists studio, show, shot, version, artist, date, frame range and review state, and carries the caution', () => {
    const rows = Object.fromEntries(slateRows(labels, 1001, 1048).map((r) => [r.label, r.value]));
    expect(rows).toMatchObject({ Studio: 'Gull Point Pictures', Show: 'Low Tide (LT)', Shot: 'LT_010', Version: 'v003', Artist: 'Ana Ruiz', Date: '2025-06-01', Review: 'submitted' });
    expect(rows.Frames).toContain('1001–1048');
    expect(rows.Frames).toContain('48 frames');
    expect(rows.Frames).toContain('source 01:00:09:16 – 01:00:11:15');
    expect(rows.Record).toBe('01:00:00:00 – 01:00:02:00 in the cut');
    expect(Object.fromEntries(slateRows({ ...labels, recordIn: null, recordOut: null }, 1001, 1048).map((r) => [r.label, r.value])).Record).toBe('not from an edit');
    const texts = slateLayout(labels, 1001, 1048, 960, 540).texts;
    expect(texts.find((t) => t.id === 'caution')!.text).toBe(CAUTION);
    expect(CAUTION).toMatch(/licensed special-effects coordinator/);
    for (const t of texts) expect(t.y).toBeLessThan(540);
    // The rows end above the caution strip at any size (the strip is the third band).
    for (const h of [180, 270, 540, 1080, 2160]) {
      const l = slateLayout(labels, 1001, 1048, Math.round((h * 16) / 9), h);
      const strip = l.bands[2];
      const rowsBottom = Math.max(...l.texts.filter((t) => t.id !== 'caution').map((t) => t.y));
      expect(rowsBottom).toBeLessThan(strip.y);
      expect(l.texts.find((t) => t.id === 'caution')!.y).toBeGreaterThan(strip.y);
    }
  });
});

describe('names and encoder settings', () => {
  it('names files and ZIP entries predictably', () => {
    // Show code, shot code, v003, frame range (common practice, no source); a shot code that already carries the
    // show's code is not prefixed twice.
    expect(exportFileName(labels, 1001, 1048, 'mp4')).toBe('LT_010_v003_1001-1048.mp4');
    expect(exportFileName({ ...labels, shotCode: '010' }, 1001, 1048, 'gif')).toBe('LT_010_v003_1001-1048.gif');
    expect(exportFileName({ ...labels, shotCode: 'LTX_010' }, 1001, 1048, 'gif')).toBe('LT_LTX_010_v003_1001-1048.gif');
    expect(zipEntryName(labels, 1001)).toBe('LT_010_v003.1001.png');
    expect(zipEntryName(labels, 'slate')).toBe('LT_010_v003.0000_slate.png');
  });
  it('asks ffmpeg for H.264 yuv420p at the shot rate (23.976 as 24000/1001)', () => {
    expect(ffmpegRate('24')).toBe('24');
    expect(ffmpegRate('23.976')).toBe('24000/1001');
    expect(ffmpegRate('29.97df')).toBe('30000/1001');
    const args = mp4Args('25');
    expect(args.join(' ')).toContain('-c:v libx264');
    expect(args.join(' ')).toContain('-pix_fmt yuv420p');
    expect(args.join(' ')).toContain('-framerate 25');
    expect(args.join(' ')).toContain('-r 25');
    expect(args).not.toContain('-timecode');
    expect(mp4Args('25', '01:00:09:24').join(' ')).toContain('-timecode 01:00:09:24 -movflags');
  });
  it("gives the MP4's timecode track the source timecode of its first picture (the slate sits on the frame before)", () => {
    const at = (rateId: string, sourceTimecodeIn: string) => ({ ...labels, rateId, cutIn: 1001, sourceTimecodeIn });
    // Source in 01:00:10:00 at the cut in; the slate one frame earlier (24 fps non-drop, SMPTE ST 12-1).
    expect(mp4StartTimecode(at('24', '01:00:10:00'), 1001, true)).toBe('01:00:09:23');
    expect(mp4StartTimecode(at('24', '01:00:10:00'), 1001, false)).toBe('01:00:10:00');
    // From the head handles (993 = 8 frames before the cut in) with a slate: 9 frames before 01:00:10:00.
    expect(mp4StartTimecode(at('24', '01:00:10:00'), 993, true)).toBe('01:00:09:15');
    // Drop frame: the frame before 00:01:00;02 is 00:00:59;29 (SMPTE ST 12-1 skips ;00 and ;01 at minute 1).
    expect(mp4StartTimecode(at('29.97df', '00:01:00;02'), 1001, true)).toBe('00:00:59;29');
    // A slate held 24 pictures (1 s at 24 fps) starts the track 24 frames before the cut in.
    expect(mp4StartTimecode(at('24', '01:00:10:00'), 1001, 24)).toBe('01:00:09:00');
    // 30 pictures at 29.97 DF before 00:01:00;02 (frame 1800, ;00 and ;01 dropped at minute 1; SMPTE ST 12-1): frame 1770 = 00:00:59;00.
    expect(mp4StartTimecode(at('29.97df', '00:01:00;02'), 1001, 30)).toBe('00:00:59;00');
  });
  it('holds the slate for the same time at every rate: seconds × fps pictures, at least one', () => {
    // 1 s by default (common practice (no source)).
    expect(DEFAULT_SLATE_SECONDS).toBe(1);
    expect(slateFrameCount(24)).toBe(24);
    expect(slateFrameCount(25)).toBe(25);
    expect(slateFrameCount(30000 / 1001)).toBe(30);
    expect(slateFrameCount(24, 2)).toBe(48);
    expect(slateFrameCount(24, 0.5)).toBe(12);
    expect(slateFrameCount(24, 0.01)).toBe(1);
  });
  it('names the held slate pictures of a PNG ZIP so they sort before the frames', () => {
    const l = { shotCode: 'PR_0010', versionNumber: 3 };
    const names = [zipEntryName(l, 1001), zipEntryName(l, 'slate', 1), zipEntryName(l, 'slate', 0), zipEntryName(l, 'slate', 23)].sort();
    expect(names).toEqual(['PR_0010_v003.0000_slate.png', 'PR_0010_v003.0000_slate_002.png', 'PR_0010_v003.0000_slate_024.png', 'PR_0010_v003.1001.png']);
  });
});

describe('progress', () => {
  it('weights the stages and estimates the time left from the rate so far', () => {
    let now = 0;
    const t = new ProgressTracker({ preparing: 0, rendering: 0.5, encoding: 0.5, uploading: 0 }, () => now);
    now = 10_000;
    const r = t.report('rendering', 1);
    expect(r.fraction).toBeCloseTo(0.5);
    expect(r.etaSeconds).toBeCloseTo(10);
    now = 15_000;
    const e = t.report('encoding', 0.5);
    expect(e.fraction).toBeCloseTo(0.75);
    expect(e.etaSeconds).toBeCloseTo(5);
    expect(t.report('encoding', 1).etaSeconds).toBe(0);
  });
});
