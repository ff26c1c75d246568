// The player's ranges follow the shot's cut range with its handles (issue: one handle convention), met with the bake.
import { describe, it, expect } from 'vitest';
import { playRanges } from '../../src/components/player/playRange';

// A shot cut 1009–1056 with 8-frame handles each side (common practice (no source): 8 handles, cut in at 1009).
const shot = { firstFrame: 1009, lastFrame: 1056, headHandles: 8, tailHandles: 8 };

describe('player ranges', () => {
  it('spans and plays the cut range with handles when the bake covers it', () => {
    const r = playRanges(shot, { start: 1001, end: 1064 });
    expect(r.timeline).toEqual({ start: 1001, end: 1064 });
    expect(r.play).toEqual({ start: 1001, end: 1064 });
  });
  it('plays only the baked part of the handles, and the timeline still shows the whole cut with handles', () => {
    const r = playRanges(shot, { start: 1009, end: 1040 });
    expect(r.timeline).toEqual({ start: 1001, end: 1064 });
    expect(r.play).toEqual({ start: 1009, end: 1040 });
  });
  it('keeps baked frames beyond the handles on the timeline but plays the cut with handles', () => {
    const r = playRanges({ ...shot, tailHandles: 2 }, { start: 990, end: 1100 });
    expect(r.timeline).toEqual({ start: 990, end: 1100 });
    expect(r.play).toEqual({ start: 1001, end: 1058 });
  });
  it('falls back to the baked range when the bake misses the cut entirely', () => {
    const r = playRanges(shot, { start: 2001, end: 2010 });
    expect(r.play).toEqual({ start: 2001, end: 2010 });
  });
});
