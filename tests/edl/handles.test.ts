// One handle convention per studio: the same edit list gives the cut range by where the first frame number falls.
import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { parseCmx3600, parseShotCsv, planFromCsv, planFromEdl } from '../../src/lib/edl';
import { sourceTimecodeAt } from '../../src/lib/timecode';

// Two 24 fps cuts (CMX 3600 layout, from memory); record out is exclusive, so they hold 48 and 30 frames.
const EDL = readFileSync(new URL('../fixtures/edl/two-cuts-24.edl', import.meta.url), 'utf8').trimEnd();

const plan = (convention: 'head-handle' | 'cut-in') => planFromEdl(parseCmx3600(EDL, '24'), { codeFrom: 'clip', handles: 8, startFrame: 1001, convention });

describe('handle conventions from the same EDL', () => {
  it('"1001 is the first head-handle frame" (common practice (no source)): cut in 1009, handles 1001–1008', () => {
    const shots = plan('head-handle').shots;
    expect(shots.map((s) => [s.code, s.firstFrame, s.lastFrame, s.handles])).toEqual([
      ['HC_010', 1009, 1056, 8],
      ['HC_020', 1009, 1038, 8],
    ]);
    expect(shots[0].firstFrame - shots[0].handles).toBe(1001);
  });

  it('"1001 is the cut in": cut 1001–1048, head handles 993–1000', () => {
    const shots = plan('cut-in').shots;
    expect(shots.map((s) => [s.code, s.firstFrame, s.lastFrame, s.handles])).toEqual([
      ['HC_010', 1001, 1048, 8],
      ['HC_020', 1001, 1030, 8],
    ]);
  });

  it('either way the cut in frame carries the event source in (CMX 3600 source in; SMPTE ST 12-1 labels)', () => {
    for (const convention of ['head-handle', 'cut-in'] as const) {
      const [s] = plan(convention).shots;
      const shot = { firstFrame: s.firstFrame, frameRate: '24', sourceTimecodeIn: s.source!.sourceIn };
      expect(sourceTimecodeAt(shot, s.firstFrame)).toBe('01:00:10:00');
      // The last frame of the cut is source out − 1 frame (out exclusive): 01:00:11:23.
      expect(sourceTimecodeAt(shot, s.lastFrame)).toBe('01:00:11:23');
    }
  });

  it('a CSV row with record timecode follows the convention too; a row with frame numbers keeps them', () => {
    const csv = ['code,record_in,record_out', 'HC_030,01:00:00:00,01:00:01:00'].join('\n');
    const parsed = parseShotCsv(csv, '24');
    expect(parsed.errors).toEqual([]);
    const head = planFromCsv(parsed, { codeFrom: 'clip', handles: 4, startFrame: 1001, convention: 'head-handle' }).shots[0];
    const cut = planFromCsv(parsed, { codeFrom: 'clip', handles: 4, startFrame: 1001, convention: 'cut-in' }).shots[0];
    expect([head.firstFrame, head.lastFrame]).toEqual([1005, 1028]);
    expect([cut.firstFrame, cut.lastFrame]).toEqual([1001, 1024]);
  });
});
