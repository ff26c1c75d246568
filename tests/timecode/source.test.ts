// Source timecode of a shot frame: the plate's timecode at the cut in plus the frame's offset from the cut in.
import { describe, it, expect } from 'vitest';
import { frameWithTimecode, rateText, sourceTimecodeAt, sourceTimecodeLabel, TimecodeError } from '../../src/lib/timecode';

describe('sourceTimecodeAt', () => {
  it('labels the cut-in frame with the source in, not the frame number (non-drop 24, SMPTE ST 12-1)', () => {
    const shot = { firstFrame: 1009, frameRate: '24', sourceTimecodeIn: '01:00:10:00' };
    expect(sourceTimecodeAt(shot, 1009)).toBe('01:00:10:00');
    expect(sourceTimecodeAt(shot, 1033)).toBe('01:00:11:00'); // 24 frames = 1 s at 24 (SMPTE ST 12-1)
    expect(sourceTimecodeAt(shot, 1001)).toBe('01:00:09:16'); // 8 head-handle frames before the cut in
  });

  it('crosses a drop-frame minute at 29.97 DF (SMPTE ST 12-1: ;00 and ;01 skipped at minute 1)', () => {
    const shot = { firstFrame: 1001, frameRate: '29.97df', sourceTimecodeIn: '00:00:59;28' };
    expect(sourceTimecodeAt(shot, 1002)).toBe('00:00:59;29');
    expect(sourceTimecodeAt(shot, 1003)).toBe('00:01:00;02');
  });

  it('keeps every tenth minute at 29.97 DF (SMPTE ST 12-1: minute 10 skips nothing)', () => {
    const shot = { firstFrame: 1001, frameRate: '29.97df', sourceTimecodeIn: '00:09:59;29' };
    expect(sourceTimecodeAt(shot, 1002)).toBe('00:10:00;00');
  });

  it('skips four labels at 59.94 DF (SMPTE ST 12-1: ;00–;03 skipped each minute not a multiple of ten)', () => {
    const shot = { firstFrame: 1, frameRate: '59.94df', sourceTimecodeIn: '00:01:59;59' };
    expect(sourceTimecodeAt(shot, 2)).toBe('00:02:00;04');
  });

  it('wraps at 24 hours (SMPTE ST 12-1 counter runs 00:00:00:00–23:59:59:ff)', () => {
    const shot = { firstFrame: 1001, frameRate: '25', sourceTimecodeIn: '23:59:59:24' };
    expect(sourceTimecodeAt(shot, 1002)).toBe('00:00:00:00');
  });

  it('reads a missing source in as 00:00:00:00 at the cut in', () => {
    expect(sourceTimecodeAt({ firstFrame: 1001, frameRate: '24', sourceTimecodeIn: null }, 1001)).toBe('00:00:00:00');
    expect(sourceTimecodeAt({ firstFrame: 1001, frameRate: '24' }, 1025)).toBe('00:00:01:00');
  });

  it('refuses a malformed source timecode; the label helper gives an empty string', () => {
    const shot = { firstFrame: 1001, frameRate: '24', sourceTimecodeIn: '1:00:00' };
    expect(() => sourceTimecodeAt(shot, 1001)).toThrow(TimecodeError);
    expect(sourceTimecodeLabel(shot, 1001)).toBe('');
  });
});

describe('rateText', () => {
  it('reads "29.97 DF" for drop frame, not the raw id "29.97df fps"; whole rates keep fps', () => {
    expect(rateText('29.97df')).toBe('29.97 DF');
    expect(rateText('59.94')).toBe('59.94 NDF');
    expect(rateText('24')).toBe('24 fps');
    expect(rateText('23.976')).toBe('23.976 fps');
  });
});

describe('frameWithTimecode', () => {
  it('pairs the frame number with its source timecode, drop frame included (SMPTE ST 12-1)', () => {
    expect(frameWithTimecode({ firstFrame: 1009, frameRate: '24', sourceTimecodeIn: '01:00:10:00' }, 1009)).toBe('1009 · 01:00:10:00');
    expect(frameWithTimecode({ firstFrame: 1001, frameRate: '29.97df', sourceTimecodeIn: '00:00:59;28' }, 1003)).toBe('1003 · 00:01:00;02');
    // Never the frame number read as timecode: 1009 at 24 fps would be 00:00:42:01.
    expect(frameWithTimecode({ firstFrame: 1009, frameRate: '24', sourceTimecodeIn: null }, 1009)).toBe('1009 · 00:00:00:00');
  });

  it('falls back to the number alone when the source timecode cannot label the frame', () => {
    expect(frameWithTimecode({ firstFrame: 1001, frameRate: '24', sourceTimecodeIn: 'not a tc' }, 1005)).toBe('1005');
  });
});
