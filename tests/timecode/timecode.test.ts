// Frames ↔ SMPTE timecode: every rate, the drop-frame rule at minute and ten-minute boundaries, bad input.
import { describe, it, expect } from 'vitest';
import { FRAME_RATES, RATES, framesToTimecode, timecodeToFrames, framesToSeconds, isTimecode, TimecodeError, framesPerDay } from '../../src/lib/timecode';

describe('timecode: drop-frame at 29.97 (SMPTE ST 12-1 drop-frame rule: labels ;00 and ;01 skipped each minute except every tenth)', () => {
  const cases: [number, string][] = [
    [0, '00:00:00;00'],
    [29, '00:00:00;29'],
    [30, '00:00:01;00'],
    [1799, '00:00:59;29'], // last label of minute 0
    [1800, '00:01:00;02'], // ;00 and ;01 skipped at minute 1
    [3597, '00:01:59;29'],
    [3598, '00:02:00;02'],
    [17981, '00:09:59;29'],
    [17982, '00:10:00;00'], // minute 10: nothing skipped
    [17983, '00:10:00;01'],
    [19781, '00:10:59;29'],
    [19782, '00:11:00;02'],
    [107892, '01:00:00;00'], // 6 × 17982 frames per hour
  ];
  for (const [frames, tc] of cases) {
    it(`${frames} ↔ ${tc}`, () => {
      expect(framesToTimecode(frames, '29.97df')).toBe(tc);
      expect(timecodeToFrames(tc, '29.97df')).toBe(frames);
    });
  }

  it('refuses labels that drop-frame skips', () => {
    expect(() => timecodeToFrames('00:01:00;00', '29.97df')).toThrow(TimecodeError);
    expect(() => timecodeToFrames('00:01:00;01', '29.97df')).toThrow(/does not exist/);
    expect(timecodeToFrames('00:10:00;00', '29.97df')).toBe(17982);
    expect(timecodeToFrames('00:10:00;01', '29.97df')).toBe(17983);
  });

  it('keeps the label within a few milliseconds of real time after an hour', () => {
    // SMPTE ST 12-1: drop-frame exists so 01:00:00;00 falls at (almost) one hour of 30000/1001 fps video.
    const seconds = framesToSeconds(timecodeToFrames('01:00:00;00', '29.97df'), '29.97df');
    expect(Math.abs(seconds - 3600)).toBeLessThan(0.004);
    // while non-drop 29.97 drifts by 3.6 s per hour (3600 × 1.001 − 3600)
    const ndf = framesToSeconds(timecodeToFrames('01:00:00:00', '29.97'), '29.97');
    expect(ndf - 3600).toBeCloseTo(3.6, 6);
  });
});

describe('timecode: drop-frame at 59.94 (SMPTE ST 12-1 drop-frame rule: labels ;00–;03 skipped each minute except every tenth)', () => {
  const cases: [number, string][] = [
    [3599, '00:00:59;59'],
    [3600, '00:01:00;04'], // four labels dropped
    [7195, '00:01:59;59'],
    [7196, '00:02:00;04'],
    [35963, '00:09:59;59'],
    [35964, '00:10:00;00'], // 10 × 3600 − 9 × 4
    [35965, '00:10:00;01'],
    [215784, '01:00:00;00'], // 6 × 35964
  ];
  for (const [frames, tc] of cases) {
    it(`${frames} ↔ ${tc}`, () => {
      expect(framesToTimecode(frames, '59.94df')).toBe(tc);
      expect(timecodeToFrames(tc, '59.94df')).toBe(frames);
    });
  }
  it('refuses the four skipped labels, accepts them at a tenth minute', () => {
    for (const ff of ['00', '01', '02', '03']) expect(isTimecode(`00:01:00;${ff}`, '59.94df')).toBe(false);
    expect(isTimecode('00:01:00;04', '59.94df')).toBe(true);
    expect(isTimecode('00:20:00;00', '59.94df')).toBe(true);
  });
});

describe('timecode: every label round-trips and drop-frame skips exactly the rule’s labels', () => {
  for (const rate of ['29.97df', '59.94df'] as const) {
    it(`${rate}: the first 21 minutes, frame by frame`, () => {
      const r = RATES[rate];
      let previous = -1;
      let skipped = 0;
      const end = timecodeToFrames(`00:21:00${';'}${String(r.dropPerMinute).padStart(2, '0')}`, rate);
      for (let f = 0; f <= end; f++) {
        const tc = framesToTimecode(f, rate);
        expect(timecodeToFrames(tc, rate)).toBe(f);
        // The label as a count of nominal frames must go up by one, except where labels were skipped.
        const [hh, mm, ss, ff] = tc.split(/[:;]/).map(Number);
        const label = ((hh * 60 + mm) * 60 + ss) * r.nominal + ff;
        if (previous >= 0 && label - previous !== 1) {
          expect(label - previous - 1).toBe(r.dropPerMinute);
          expect(ss === 0 && ff === r.dropPerMinute && mm % 10 !== 0).toBe(true);
          skipped++;
        }
        previous = label;
      }
      // minutes 1–9 and 11–19 and 21 skip labels: 19 minutes
      expect(skipped).toBe(19);
    });
  }
});

describe('timecode: non-drop rates', () => {
  // One hour of labels = 3600 × nominal frames (SMPTE ST 12-1 non-drop counting).
  const hour: [string, number][] = [
    ['23.976', 86_400],
    ['24', 86_400],
    ['25', 90_000],
    ['29.97', 108_000],
    ['30', 108_000],
    ['48', 172_800],
    ['50', 180_000],
    ['59.94', 216_000],
    ['60', 216_000],
  ];
  for (const [rate, frames] of hour) {
    it(`${rate}: 01:00:00:00 = ${frames} frames, last frame of a second, round trips`, () => {
      expect(timecodeToFrames('01:00:00:00', rate)).toBe(frames);
      expect(framesToTimecode(frames, rate)).toBe('01:00:00:00');
      const nominal = RATES[rate as keyof typeof RATES].nominal;
      expect(framesToTimecode(nominal - 1, rate)).toBe(`00:00:00:${String(nominal - 1).padStart(2, '0')}`);
      expect(framesToTimecode(nominal, rate)).toBe('00:00:01:00');
      for (const f of [0, 1, 1799, 1800, 17982, 123_457, frames * 23 + 5]) expect(timecodeToFrames(framesToTimecode(f, rate), rate)).toBe(f);
    });
  }

  it('29.97 NDF does not skip labels: frame 1800 is 00:01:00:00', () => {
    expect(framesToTimecode(1800, '29.97')).toBe('00:01:00:00');
    expect(timecodeToFrames('00:01:00:00', '29.97')).toBe(1800);
  });

  it('23.976 counts 24 labels per second but runs at 24000/1001 fps', () => {
    expect(framesToSeconds(24, '23.976')).toBeCloseTo(1.001, 9);
  });

  it('knows eleven rates with distinct ids', () => {
    expect(FRAME_RATES.length).toBe(11);
    expect(new Set(FRAME_RATES).size).toBe(11);
  });
});

describe('timecode: bad input', () => {
  it('refuses negative, fractional and ≥ 24 h frame counts', () => {
    expect(() => framesToTimecode(-1, '24')).toThrow(/negative/);
    expect(() => framesToTimecode(1.5, '24')).toThrow(/whole number/);
    expect(() => framesToTimecode(framesPerDay('24'), '24')).toThrow(/24 hours/);
    expect(framesToTimecode(framesPerDay('29.97df') - 1, '29.97df')).toBe('23:59:59;29');
  });
  it('refuses malformed labels and out-of-range fields', () => {
    expect(() => timecodeToFrames('1:00:00:00', '24')).toThrow(/not a timecode/);
    expect(() => timecodeToFrames('00:00:00', '24')).toThrow(/not a timecode/);
    expect(() => timecodeToFrames('00:60:00:00', '24')).toThrow(/minutes/);
    expect(() => timecodeToFrames('00:00:60:00', '24')).toThrow(/seconds/);
    expect(() => timecodeToFrames('24:00:00:00', '24')).toThrow(/hours/);
    expect(() => timecodeToFrames('00:00:00:24', '24')).toThrow(/frames must be 00–23/);
    expect(timecodeToFrames('00:00:00:24', '25')).toBe(24);
  });
  it('refuses an unknown rate', () => {
    expect(() => framesToTimecode(1, '29.97DF')).toThrow(/Unknown frame rate/);
    expect(() => timecodeToFrames('00:00:00:00', '12')).toThrow(/Unknown frame rate/);
  });
});
