// The turnover edit list: written in CMX 3600 layout and read back by our own parser and import plan, the events keep
// their record timecode, duration, source in, reel and clip name.
import { describe, it, expect } from 'vitest';
import { parseCmx3600, planFromEdl, writeCmx3600, EdlWriteError } from '../../src/lib/edl';
import { sourceTimecodeAt, timecodeToFrames } from '../../src/lib/timecode';

const options = { codeFrom: 'clip' as const, headHandles: 8, tailHandles: 8, startFrame: 1001 };

describe('turnover EDL writer (CMX 3600 layout, from memory)', () => {
  it('non-drop at 24: one cut event per shot in record order, re-read with the same record range and duration', () => {
    const events = [
      { reel: 'RL02', sourceIn: '02:00:05:00', recordIn: '01:00:04:00', recordOut: '01:00:06:12', clipName: 'HB_020_v003.mp4' },
      { reel: 'RL 01', sourceIn: '01:00:10:00', recordIn: '01:00:00:00', recordOut: '01:00:02:00', clipName: 'HB_010_v001.mp4' },
    ];
    const text = writeCmx3600('HARBOUR TURNOVER', '24', events);
    expect(text.split('\r\n')[1]).toBe('FCM: NON-DROP FRAME');
    const parsed = parseCmx3600(text, '24');
    expect(parsed.errors).toEqual([]);
    expect(parsed.title).toBe('HARBOUR TURNOVER');
    expect(parsed.events.map((e) => [e.event, e.reel, e.recordIn, e.recordOut, e.sourceIn, e.clipName])).toEqual([
      // Sorted by record in; a reel is one token, so the space became '_'.
      ['001', 'RL_01', '01:00:00:00', '01:00:02:00', '01:00:10:00', 'HB_010_v001.mp4'],
      ['002', 'RL02', '01:00:04:00', '01:00:06:12', '02:00:05:00', 'HB_020_v003.mp4'],
    ]);
    // Source out = source in + record duration: 60 frames at 24 fps from 02:00:05:00 (out exclusive, CMX 3600).
    expect(parsed.events[1].sourceOut).toBe('02:00:07:12');
    const plan = planFromEdl(parsed, options);
    expect(plan.shots.map((s) => s.lastFrame - s.firstFrame + 1)).toEqual([48, 60]);
    const [s] = plan.shots;
    // The cut in frame still carries the event's source in.
    expect(sourceTimecodeAt({ firstFrame: s.firstFrame, frameRate: '24', sourceTimecodeIn: s.source!.sourceIn }, s.firstFrame)).toBe('01:00:10:00');
  });

  it('drop-frame at 29.97: FCM DROP FRAME, ";" labels, durations across a dropped minute kept (SMPTE ST 12-1)', () => {
    const text = writeCmx3600('DF', '29.97df', [{ reel: null, sourceIn: '00:00:59;20', recordIn: '00:59:59;20', recordOut: '01:01:00;10', clipName: 'X.mp4' }]);
    const parsed = parseCmx3600(text, '29.97df');
    expect(parsed.errors).toEqual([]);
    expect(parsed.fcm).toBe('DROP FRAME');
    const [ev] = parsed.events;
    expect(ev.reel).toBe('AX');
    const dur = timecodeToFrames('01:01:00;10', '29.97df') - timecodeToFrames('00:59:59;20', '29.97df');
    expect(ev.recordOutFrame - ev.recordInFrame).toBe(dur);
    // Source 00:00:59;20 + dur crosses minute 1, where labels ;00 and ;01 are skipped (SMPTE ST 12-1).
    expect(timecodeToFrames(ev.sourceOut, '29.97df') - timecodeToFrames(ev.sourceIn, '29.97df')).toBe(dur);
    expect(ev.sourceOut).toMatch(/;/);
  });

  it('refuses an event whose record out is not after its record in', () => {
    expect(() => writeCmx3600('T', '24', [{ reel: 'A', sourceIn: null, recordIn: '01:00:00:00', recordOut: '01:00:00:00', clipName: null }])).toThrow(EdlWriteError);
  });
});
