// What an import keeps from the edit: the source timecode of the cut in, record in/out, reel and clip name, so the
// shot's frames can be labelled with the plate's own timecode.
import { describe, it, expect } from 'vitest';
import { parseCmx3600, parseShotCsv, planFromCsv, planFromEdl } from '../../src/lib/edl';
import { sourceTimecodeAt } from '../../src/lib/timecode';

const options = { codeFrom: 'clip' as const, headHandles: 8, tailHandles: 8, startFrame: 1001 };

describe('EDL import keeps source and record timecode (CMX 3600 layout, from memory)', () => {
  it('drop-frame events: source in, record in/out, reel, clip name; frames labelled per SMPTE ST 12-1', () => {
    const edl = [
      'TITLE: HARBOUR CUT',
      'FCM: DROP FRAME',
      '001  RL01     V     C        01:00:59;28 01:01:00;06 00:59:59;28 01:00:00;06',
      '* FROM CLIP NAME: HB_010.mov',
    ].join('\n');
    const plan = planFromEdl(parseCmx3600(edl, '29.97df'), options);
    expect(plan.errors).toEqual([]);
    const [s] = plan.shots;
    expect(s.source).toMatchObject({ reel: 'RL01', clipName: 'HB_010.mov', sourceIn: '01:00:59;28', recordIn: '00:59:59;28', recordOut: '01:00:00;06' });
    // 00:59:59;28 → 01:00:00;06 is 8 frames at 29.97 DF (minute 60 is a multiple of ten: nothing skipped, SMPTE ST 12-1).
    expect([s.firstFrame, s.lastFrame]).toEqual([1009, 1016]);
    const shot = { firstFrame: s.firstFrame, frameRate: '29.97df', sourceTimecodeIn: s.source!.sourceIn };
    expect(sourceTimecodeAt(shot, 1009)).toBe('01:00:59;28');
    // Two frames on crosses minute 1:01, where ;00 and ;01 are skipped (SMPTE ST 12-1 drop-frame rule).
    expect(sourceTimecodeAt(shot, 1011)).toBe('01:01:00;02');
    expect(sourceTimecodeAt(shot, 1016)).toBe('01:01:00;07');
  });

  it('non-drop events at 24: the cut in is labelled with the source in, not with the frame number', () => {
    const edl = ['FCM: NON-DROP FRAME', '001  RL02     V     C        01:00:10:00 01:00:12:00 01:00:00:00 01:00:02:00', '* FROM CLIP NAME: HB_020'].join('\n');
    const [s] = planFromEdl(parseCmx3600(edl, '24'), options).shots;
    const shot = { firstFrame: s.firstFrame, frameRate: '24', sourceTimecodeIn: s.source!.sourceIn };
    expect(sourceTimecodeAt(shot, s.firstFrame)).toBe('01:00:10:00');
    expect(sourceTimecodeAt(shot, s.lastFrame)).toBe('01:00:11:23'); // 48 frames, out exclusive (CMX 3600)
    expect(s.source).toMatchObject({ recordIn: '01:00:00:00', recordOut: '01:00:02:00' });
  });
});

describe('CSV import takes optional source_in, reel and clip_name columns', () => {
  it('keeps them, normalised at the rate, and reports a bad source_in on its line', () => {
    const csv = ['code,first,last,source_in,reel,clip_name', 'HB_030,1001,1048,01:02:03:04,RL03,HB_030.mov', 'HB_040,1001,1048,01:02:03:24,,', 'HB_050,1001,1010,,,'].join('\n');
    const parsed = parseShotCsv(csv, '24');
    expect(parsed.errors).toEqual([{ line: 3, message: expect.stringMatching(/source_in/) }]);
    const plan = planFromCsv(parsed, options);
    expect(plan.shots[0].source).toMatchObject({ sourceIn: '01:02:03:04', reel: 'RL03', clipName: 'HB_030.mov' });
    expect(plan.shots[1].source).toBeUndefined();
  });
});
