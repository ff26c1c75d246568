// One handle convention per studio: the same edit list gives the cut range by where the first frame number falls.
import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { parseCmx3600, parseShotCsv, planFromCsv, planFromEdl } from '../../src/lib/edl';
import { sourceTimecodeAt } from '../../src/lib/timecode';
import { cutInFrame, rangeWithHandles, tailHandlesOf } from '../../src/lib/library/handles';

// Two 24 fps cuts (CMX 3600 layout, from memory); record out is exclusive, so they hold 48 and 30 frames.
const EDL = readFileSync(new URL('../fixtures/edl/two-cuts-24.edl', import.meta.url), 'utf8').trimEnd();

// Head and tail apart (8 before the cut in, 12 after the cut out) so a swap of the two would show.
const plan = (convention: 'head-handle' | 'cut-in') =>
  planFromEdl(parseCmx3600(EDL, '24'), { codeFrom: 'clip', headHandles: 8, tailHandles: 12, startFrame: 1001, convention });

describe('handle conventions from the same EDL', () => {
  it('"1001 is the first head-handle frame" (common practice (no source)): cut in 1009, head handles 1001–1008', () => {
    const shots = plan('head-handle').shots;
    expect(shots.map((s) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
      ['HC_010', 1009, 1056, 8, 12],
      ['HC_020', 1009, 1038, 8, 12],
    ]);
    // With handles: 1001 … cut out + 12 tail frames.
    expect(shots.map((s) => rangeWithHandles(s))).toEqual([
      { first: 1001, last: 1068 },
      { first: 1001, last: 1050 },
    ]);
  });

  it('"1001 is the cut in": cut 1001–1048, head handles 993–1000, tail 1049–1060', () => {
    const shots = plan('cut-in').shots;
    expect(shots.map((s) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
      ['HC_010', 1001, 1048, 8, 12],
      ['HC_020', 1001, 1030, 8, 12],
    ]);
    expect(rangeWithHandles(shots[0])).toEqual({ first: 993, last: 1060 });
  });

  it('a new shot made by hand is placed by the same rule as an import', () => {
    expect(cutInFrame('head-handle', 8)).toBe(1009);
    expect(cutInFrame('cut-in', 8)).toBe(1001);
    expect(cutInFrame('head-handle', 0, 1)).toBe(1);
  });

  it('a tail never stored apart (null) counts as many frames as the head', () => {
    expect(tailHandlesOf({ headHandles: 6, tailHandles: null })).toBe(6);
    expect(tailHandlesOf({ headHandles: 6, tailHandles: 0 })).toBe(0);
    expect(rangeWithHandles({ firstFrame: 1009, lastFrame: 1056, headHandles: 8, tailHandles: null })).toEqual({ first: 1001, last: 1064 });
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
    const head = planFromCsv(parsed, { codeFrom: 'clip', headHandles: 4, tailHandles: 2, startFrame: 1001, convention: 'head-handle' }).shots[0];
    const cut = planFromCsv(parsed, { codeFrom: 'clip', headHandles: 4, tailHandles: 2, startFrame: 1001, convention: 'cut-in' }).shots[0];
    expect([head.firstFrame, head.lastFrame]).toEqual([1005, 1028]);
    expect([cut.firstFrame, cut.lastFrame]).toEqual([1001, 1024]);
  });
});
