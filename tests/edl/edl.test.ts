// CMX 3600 edit lists and CSV shot lists: parsing, errors by line number, and the import preview (create / update / unchanged).
import { describe, it, expect } from 'vitest';
import { parseCmx3600, parseShotCsv, planFromEdl, planFromCsv, previewImport, previewText, fillPattern, codeFromClipName, type ExistingShot } from '../../src/lib/edl';
import { timecodeToFrames } from '../../src/lib/timecode';

// An edit list in the CMX 3600 layout (from memory: event number, reel, track, transition [+ length], source in,
// source out, record in, record out; record out exclusive; "* FROM CLIP NAME:" comments after the event).
const lines = [
  'TITLE: CANNONBALL CUT 3', //                                                                       line 1
  'FCM: NON-DROP FRAME', //                                                                           line 2
  '', //                                                                                              line 3
  '001  A001C003 V     C        14:22:10:05 14:22:12:05 01:00:00:00 01:00:02:00', //                   line 4
  '* FROM CLIP NAME: CNB_010.mov', //                                                                 line 5
  '* SOURCE FILE: A001C003_220914.mov', //                                                            line 6
  '002  A001C007 V     C        15:01:00:00 15:01:01:12 01:00:02:00 01:00:03:12', //                   line 7
  '* FROM CLIP NAME: CNB_020.mov', //                                                                 line 8
  '003  A001C007 V     C        15:01:01:12 15:01:01:12 01:00:03:12 01:00:03:12', //                   line 9
  '003  A002C001 V     D    012 09:10:00:00 09:10:03:00 01:00:03:12 01:00:06:12', //                   line 10
  'EFFECTS NAME IS CROSS DISSOLVE', //                                                                line 11
  '* FROM CLIP NAME: CNB_020.mov', //                                                                 line 12
  '* TO CLIP NAME: CNB_030.mov', //                                                                   line 13
  '004  A002C004 A     C        09:20:00:00 09:20:03:00 01:00:06:12 01:00:09:12', //                   line 14 (audio only)
  '005  BL       V     C        00:00:00:00 00:00:00:12 01:00:06:12 01:00:07:00', //                   line 15 (black)
  '006  A003C002 V     C        10:00:00:00 10:00:61:00 01:00:07:00 01:00:08:00', //                   line 16 (bad source out)
  'this line is not part of any edit list', //                                                        line 17
  '007  A003C009 V     C        10:10:00:00 10:10:01:00 01:00:07:00 01:00:08:00', //                   line 18
  '* FROM CLIP NAME: CNB_040 plate.mov', //                                                           line 19
  '008  A003C010 V     X        10:10:00:00 10:10:01:00 01:00:08:00 01:00:09:00', //                   line 20 (unknown transition)
];
const EDL = lines.join('\r\n');

const options = { codeFrom: 'clip' as const, headHandles: 8, tailHandles: 8, startFrame: 1001 }; // 1001: common practice (no source)

describe('CMX 3600 parser', () => {
  const parsed = parseCmx3600(EDL, '24');

  it('reads the title and FCM lines', () => {
    expect(parsed.title).toBe('CANNONBALL CUT 3');
    expect(parsed.fcm).toBe('NON-DROP FRAME');
  });

  it('reads cuts, both sides of a dissolve, audio and black events with line numbers and frame counts', () => {
    expect(parsed.events.map((e) => [e.line, e.event, e.reel, e.track, e.transition])).toEqual([
      [4, '001', 'A001C003', 'V', 'C'],
      [7, '002', 'A001C007', 'V', 'C'],
      [9, '003', 'A001C007', 'V', 'C'],
      [10, '003', 'A002C001', 'V', 'D'],
      [14, '004', 'A002C004', 'A', 'C'],
      [15, '005', 'BL', 'V', 'C'],
      [18, '007', 'A003C009', 'V', 'C'],
    ]);
    const first = parsed.events[0];
    // 01:00:00:00 at 24 fps = 3600 × 24 = 86400 frames; 01:00:02:00 = 86400 + 48 (SMPTE ST 12-1 non-drop counting)
    expect([first.recordInFrame, first.recordOutFrame]).toEqual([86_400, 86_448]);
    const dissolve = parsed.events[3];
    expect(dissolve.transitionFrames).toBe(12);
    expect(dissolve.sourceIn).toBe('09:10:00:00');
  });

  it('takes clip names from FROM / TO CLIP NAME comments, the TO name for the incoming side of a dissolve', () => {
    expect(parsed.events.map((e) => e.clipName)).toEqual(['CNB_010.mov', 'CNB_020.mov', 'CNB_020.mov', 'CNB_030.mov', null, null, 'CNB_040 plate.mov']);
    expect(parsed.events[0].comments).toEqual(['SOURCE FILE: A001C003_220914.mov']);
  });

  it('reports each unreadable line by its number and keeps reading', () => {
    expect(parsed.errors.map((e) => e.line)).toEqual([16, 17, 20]);
    expect(parsed.errors[0].message).toMatch(/timecode.*seconds/);
    expect(parsed.errors[1].message).toMatch(/cannot read this line/);
    expect(parsed.errors[2].message).toMatch(/unknown transition "X"/);
  });

  it('plans one shot per picture event: code from the clip name, range from record in/out, handles added', () => {
    const plan = planFromEdl(parsed, options);
    // Cut in = 1001 + 8 handles = 1009 (common practice, no source: frame 1001 is the first frame with handles).
    // Event 001: 48 frames → 1009–1056; 002: 1 s 12 f = 36 → 1009–1044; 003 dissolve incoming: 3 s = 72 → 1009–1080;
    // 007: 24 → 1009–1032. The zero-length outgoing line of the dissolve, the audio and the black events make no shot.
    expect(plan.shots.map((s) => [s.line, s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
      [4, 'CNB_010', 1009, 1056, 8, 8],
      [7, 'CNB_020', 1009, 1044, 8, 8],
      [10, 'CNB_030', 1009, 1080, 8, 8],
      [18, 'CNB_040', 1009, 1032, 8, 8],
    ]);
    expect(plan.shots[0].source).toMatchObject({ reel: 'A001C003', recordIn: '01:00:00:00', recordOut: '01:00:02:00' });
  });

  it('plans codes from a pattern', () => {
    const plan = planFromEdl(parsed, { ...options, codeFrom: 'pattern', pattern: 'CNB_{n:03}0' });
    expect(plan.shots.map((s) => s.code)).toEqual(['CNB_0010', 'CNB_0020', 'CNB_0030', 'CNB_0040']);
    const byEvent = planFromEdl(parsed, { ...options, codeFrom: 'pattern', pattern: 'SH{event:04}' });
    expect(byEvent.shots.map((s) => s.code)).toEqual(['SH0001', 'SH0002', 'SH0003', 'SH0007']);
  });

  it('reads DROP FRAME lists at 29.97 DF: a cut across a minute boundary is 4 frames, not 6', () => {
    const edl = [
      'TITLE: DF TEST',
      'FCM: DROP FRAME',
      '001  TAPE1    V     C        00:00:59;28 00:01:00;04 00:00:59;28 00:01:00;04',
      '* FROM CLIP NAME: DF_010',
      '002  TAPE1    V     C        00:09:59;28 00:10:00;02 00:09:59;28 00:10:00;02',
      '* FROM CLIP NAME: DF_020',
      '003  TAPE1    V     C        00:02:00;00 00:02:00;10 00:02:00;00 00:02:00;10',
    ].join('\n');
    const p = parseCmx3600(edl, '29.97df');
    expect(p.fcm).toBe('DROP FRAME');
    // SMPTE ST 12-1 drop-frame rule: ;28 ;29 then ;02 ;03 at minute 1 → frames 1798…1801, out exclusive at 1802.
    expect([p.events[0].recordInFrame, p.events[0].recordOutFrame]).toEqual([1798, 1802]);
    // Minute 10 keeps ;00 and ;01: 00:09:59;28 = 17980, 00:10:00;02 = 17984 → 4 frames.
    expect([p.events[1].recordInFrame, p.events[1].recordOutFrame]).toEqual([17980, 17984]);
    expect(p.events[0].dropFrame).toBe(true);
    // 00:02:00;00 does not exist in drop-frame: reported on its line.
    expect(p.errors).toEqual([{ line: 7, message: expect.stringMatching(/does not exist in drop-frame/) }]);
    const plan = planFromEdl(p, { ...options, headHandles: 0, tailHandles: 0 });
    expect(plan.shots.map((s) => [s.code, s.firstFrame, s.lastFrame])).toEqual([
      ['DF_010', 1001, 1004],
      ['DF_020', 1001, 1004],
    ]);
    // The same labels read as non-drop would count 6 frames (00:00:59:28 → 00:01:00:04 at 30 labels per second).
    expect(timecodeToFrames('00:01:00:04', '29.97') - timecodeToFrames('00:00:59:28', '29.97')).toBe(6);
  });

  it('reads a NON-DROP FRAME list at a 29.97 DF show as non-drop', () => {
    const p = parseCmx3600('FCM: NON-DROP FRAME\n001  T V C 00:00:59:28 00:01:00:04 00:00:59:28 00:01:00:04\n', '29.97df');
    expect(p.errors).toEqual([]);
    expect(p.events[0].recordOutFrame - p.events[0].recordInFrame).toBe(6);
    expect(p.events[0].dropFrame).toBe(false);
  });

  it('refuses DROP FRAME at a rate without drop-frame, on the FCM line', () => {
    const p = parseCmx3600('TITLE: X\nFCM: DROP FRAME\n001  T V C 00:00:01:00 00:00:02:00 00:00:01:00 00:00:02:00\n', '25');
    expect(p.errors).toEqual([{ line: 2, message: expect.stringMatching(/needs a 29.97 or 59.94/) }]);
    expect(p.events[0].recordInFrame).toBe(25);
  });

  it('reports a record out before record in, and a dissolve without its length', () => {
    const p = parseCmx3600(
      ['001  T V C 00:00:01:00 00:00:02:00 00:00:05:00 00:00:04:00', '002  T V D 00:00:01:00 00:00:02:00 00:00:05:00 00:00:06:00'].join('\n'),
      '24',
    );
    expect(p.errors.map((e) => [e.line, /before record in/.test(e.message) || /needs its length/.test(e.message)])).toEqual([
      [1, true],
      [2, true],
    ]);
  });

  it('an event without a clip name is an error when codes come from clip names', () => {
    const p = parseCmx3600('001  T V C 00:00:01:00 00:00:02:00 00:00:01:00 00:00:02:00\n', '24');
    const plan = planFromEdl(p, options);
    expect(plan.shots).toEqual([]);
    expect(plan.errors).toEqual([{ line: 1, message: expect.stringMatching(/no clip name/) }]);
  });
});

describe('import preview', () => {
  const existingFrom = (codes: [string, number, number, number, number][]): ExistingShot[] =>
    codes.map(([code, firstFrame, lastFrame, headHandles, tailHandles], i) => ({ id: i + 1, code, firstFrame, lastFrame, headHandles, tailHandles }));

  it('re-importing an updated edit reports changed ranges, not duplicates', () => {
    const first = previewText('edl', EDL, '24', [], options);
    expect(first.create.map((s) => s.code)).toEqual(['CNB_010', 'CNB_020', 'CNB_030', 'CNB_040']);
    const existing = existingFrom(first.create.map((s) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles]));
    // The editor trims CNB_020 by 6 frames at the tail and adds a shot.
    const updated = EDL.replace('15:01:00:00 15:01:01:12 01:00:02:00 01:00:03:12', '15:01:00:00 15:01:01:06 01:00:02:00 01:00:03:06').concat(
      '\r\n009  A004C001 V     C        11:00:00:00 11:00:02:00 01:00:09:00 01:00:11:00\r\n* FROM CLIP NAME: CNB_050.mov\r\n',
    );
    const second = previewText('edl', updated, '24', existing, options);
    expect(second.create.map((s) => [s.code, s.firstFrame, s.lastFrame])).toEqual([['CNB_050', 1009, 1056]]);
    expect(second.update).toEqual([{ id: 2, line: 7, code: 'CNB_020', from: { first: 1009, last: 1044, headHandles: 8, tailHandles: 8 }, to: { first: 1009, last: 1038, headHandles: 8, tailHandles: 8 }, source: expect.objectContaining({ reel: 'A001C007', recordIn: '01:00:02:00' }), approved: false }]);
    expect(second.unchanged.map((s) => s.code)).toEqual(['CNB_010', 'CNB_030', 'CNB_040']);
    expect(second.errors.map((e) => e.line)).toEqual([16, 17, 20]);
  });

  it('matches codes case-insensitively and reports a code used twice on its second line', () => {
    const planned = [
      { line: 2, code: 'sh010', firstFrame: 1001, lastFrame: 1010, headHandles: 8, tailHandles: 8, description: null },
      { line: 3, code: 'SH020', firstFrame: 1001, lastFrame: 1010, headHandles: 8, tailHandles: 8, description: null },
      { line: 4, code: 'SH020', firstFrame: 1001, lastFrame: 1020, headHandles: 8, tailHandles: 8, description: null },
      { line: 5, code: 'bad code!', firstFrame: 1001, lastFrame: 1020, headHandles: 8, tailHandles: 8, description: null },
    ];
    const p = previewImport(existingFrom([['SH010', 1001, 1010, 8, 8]]), planned);
    expect(p.unchanged.map((s) => s.code)).toEqual(['SH010']);
    expect(p.create.map((s) => s.line)).toEqual([3]);
    expect(p.errors).toEqual([
      { line: 4, message: 'code SH020 is already used on line 3' },
      { line: 5, message: expect.stringMatching(/not a usable shot code/) },
    ]);
  });
});

describe('CSV shot lists', () => {
  it('reads frame ranges, optional handles and quoted descriptions; reports bad rows by line', () => {
    const csv = [
      'code,first,last,handles,description',
      'LHK_0100,1001,1072,8,"Wide, first wave"',
      'LHK_0200,1001,1060,,"Wave slaps ""the wall"""',
      'LHK_0300,1001,990,8,last before first',
      ',1001,1010,8,no code',
      'LHK_0400,abc,1010,8,',
      'LHK_0500,1001,1010,-2,negative handles',
      '',
      'LHK_0600,1001,1100',
    ].join('\n');
    const parsed = parseShotCsv(csv, '24');
    expect(parsed.mode).toBe('frames');
    expect(parsed.rows.map((r) => [r.line, r.code, r.first, r.last, r.headHandles, r.tailHandles, r.description])).toEqual([
      [2, 'LHK_0100', 1001, 1072, 8, 8, 'Wide, first wave'],
      [3, 'LHK_0200', 1001, 1060, undefined, undefined, 'Wave slaps "the wall"'],
      [9, 'LHK_0600', 1001, 1100, undefined, undefined, undefined],
    ]);
    expect(parsed.errors.map((e) => e.line)).toEqual([4, 5, 6, 7]);
    expect(parsed.errors[0].message).toMatch(/before first/);
    const plan = planFromCsv(parsed, { ...options, headHandles: 4, tailHandles: 6 });
    // Frame rows keep their numbers; a row without handles takes the options' head and tail.
    expect(plan.shots.map((s) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
      ['LHK_0100', 1001, 1072, 8, 8],
      ['LHK_0200', 1001, 1060, 4, 6],
      ['LHK_0600', 1001, 1100, 4, 6],
    ]);
  });

  it('reads head_handles and tail_handles columns, each winning over "handles" for its end', () => {
    const csv = ['code,first,last,handles,head_handles,tail_handles', 'HT_010,1009,1056,8,,12', 'HT_020,1001,1048,,0,', 'HT_030,1001,1048,4,x,'].join('\n');
    const parsed = parseShotCsv(csv, '24');
    expect(parsed.rows.map((r) => [r.code, r.headHandles, r.tailHandles])).toEqual([
      ['HT_010', 8, 12],
      ['HT_020', 0, undefined],
    ]);
    expect(parsed.errors).toEqual([{ line: 4, message: 'head_handles must be a whole number of frames, 0 or more, found "x"' }]);
    const plan = planFromCsv(parsed, { ...options, headHandles: 8, tailHandles: 8 });
    expect(plan.shots.map((s) => [s.code, s.headHandles, s.tailHandles])).toEqual([
      ['HT_010', 8, 12],
      ['HT_020', 0, 8],
    ]);
  });

  it('reads timecode rows at the show rate (drop-frame included)', () => {
    const csv = 'shot,tc_in,tc_out\nDF_010,00:00:59;28,00:01:00;04\nDF_020,00:00:10;00,00:00:09;00\n';
    const parsed = parseShotCsv(csv, '29.97df');
    expect(parsed.mode).toBe('timecode');
    expect(parsed.errors).toEqual([{ line: 3, message: expect.stringMatching(/must be after/) }]);
    const plan = planFromCsv(parsed, { ...options, headHandles: 8, tailHandles: 8 });
    // SMPTE ST 12-1 drop-frame rule: 4 frames; placed at 1001 + 8 handles (common practice, no source).
    expect(plan.shots.map((s) => [s.code, s.firstFrame, s.lastFrame])).toEqual([['DF_010', 1009, 1012]]);
  });

  it('refuses a header it does not know, naming the column', () => {
    const parsed = parseShotCsv('code,start,end\nA,1,2\n', '24');
    expect(parsed.rows).toEqual([]);
    expect(parsed.errors).toEqual([{ line: 1, message: expect.stringMatching(/unknown columns: start, end/) }]);
  });
});

describe('codes', () => {
  it('fills patterns and cleans clip names', () => {
    expect(fillPattern('CNB_{n:03}0', { n: 7 })).toBe('CNB_0070');
    expect(fillPattern('{reel}_{n}', { n: 12, reel: 'A001' })).toBe('A001_12');
    expect(() => fillPattern('{shot}', { n: 1 })).toThrow(/unknown placeholder/);
    expect(codeFromClipName('  CNB 010 (v2).mov ')).toBe('CNB_010_v2') // trailing separators trimmed;
    expect(codeFromClipName('A001C003_220914.R3D')).toBe('A001C003_220914');
  });
});

// Import rules: what an import skips and says so, default codes without plate suffixes, approved shots flagged.
// The edit list below is written in the CMX 3600 layout (event, reel, track, transition, source in/out, record in/out,
// record out exclusive — CMX 3600 layout, from memory); the plate suffixes are common practice (no source).
describe('import rules', () => {
  const edl = [
    'TITLE: HARBOUR WALL CUT 2', //                                                                     line 1
    'FCM: NON-DROP FRAME', //                                                                           line 2
    '001  A010C001 V     C        11:00:00:00 11:00:02:00 01:00:00:00 01:00:02:00', //                   line 3
    '* FROM CLIP NAME: PR_0010_plate.exr', //                                                           line 4
    '002  A010C002 A     C        11:10:00:00 11:10:02:00 01:00:00:00 01:00:02:00', //                   line 5 (sound only)
    '* FROM CLIP NAME: PR_0010_wild_track.wav', //                                                      line 6
    '003  A010C003 V     C        11:20:00:00 11:20:01:00 01:00:02:00 01:00:03:00', //                   line 7
    '* FROM CLIP NAME: PR_0020_bg_v01.mov', //                                                          line 8
    '004  BL       V     C        00:00:00:00 00:00:00:12 01:00:03:00 01:00:03:12', //                   line 9 (black)
    '005  A010C004 AA    C        11:30:00:00 11:30:01:00 01:00:03:12 01:00:04:12', //                   line 10 (sound, two channels)
    '006  A010C005 V     C        11:40:00:00 11:40:03:00 01:00:03:12 01:00:06:12', //                   line 11
    '* FROM CLIP NAME: PR_0030-v12.dpx', //                                                             line 12
  ].join('\n');
  const parsed = parseCmx3600(edl, '24');

  it('lists sound-only and black events as skipped, with the reason, and makes shots of the picture events only', () => {
    const plan = planFromEdl(parsed, options);
    expect(plan.shots.map((s) => s.line)).toEqual([3, 7, 11]);
    expect(plan.skipped.map((e) => [e.line, e.event, e.track])).toEqual([
      [5, '002', 'A'],
      [9, '004', 'V'],
      [10, '005', 'AA'],
    ]);
    expect(plan.skipped[0].reason).toMatch(/sound only \(track A\)/);
    expect(plan.skipped[1].reason).toMatch(/black/);
    expect(plan.skipped[2].reason).toMatch(/sound only \(track AA\)/);
    const preview = previewText('edl', edl, '24', [], options);
    expect(preview.skipped).toHaveLength(3);
    expect(preview.create).toHaveLength(3);
  });

  it('makes the default code from the clip name without the extension and plate suffixes', () => {
    expect(planFromEdl(parsed, options).shots.map((s) => s.code)).toEqual(['PR_0010', 'PR_0020', 'PR_0030']);
    expect(codeFromClipName('PR_0010_plate')).toBe('PR_0010');
    expect(codeFromClipName('HBR_0040_plate_v003.mov')).toBe('HBR_0040');
    expect(codeFromClipName('HBR_0040_BG.exr')).toBe('HBR_0040');
    expect(codeFromClipName('HBR_0040_comp.mov')).toBe('HBR_0040_comp'); // not a plate suffix: kept
    expect(codeFromClipName('plate_v01.mov')).toBe('plate'); // never stripped to nothing
    expect(codeFromClipName('SH.0100.bg')).toBe('SH.0100');
  });

  it('takes a code the user typed over the default, by line, and checks it like any code', () => {
    const typed = previewText('edl', edl, '24', [], { ...options, codes: { '7': 'PR_0025' } });
    expect(typed.create.map((s) => s.code)).toEqual(['PR_0010', 'PR_0025', 'PR_0030']);
    const bad = previewText('edl', edl, '24', [], { ...options, codes: { '7': 'has space' } });
    expect(bad.errors.map((e) => e.line)).toEqual([7]);
    expect(bad.create.map((s) => s.code)).toEqual(['PR_0010', 'PR_0030']);
  });

  it('flags a range change on an approved shot; other shots and unchanged approved ones are not flagged', () => {
    // 01:00:00:00–01:00:02:00 at 24 fps is 48 frames (SMPTE ST 12-1 non-drop counting): with 8 frames of head
    // handle from 1001, cut in 1009, cut out 1056.
    const existing: ExistingShot[] = [
      { id: 1, code: 'PR_0010', firstFrame: 1009, lastFrame: 1056, headHandles: 8, tailHandles: 8, approved: true },
      { id: 2, code: 'PR_0020', firstFrame: 1009, lastFrame: 1040, headHandles: 8, tailHandles: 8, approved: true },
      { id: 3, code: 'PR_0030', firstFrame: 1009, lastFrame: 1040, headHandles: 8, tailHandles: 8, approved: false },
    ];
    const preview = previewText('edl', edl, '24', existing, options);
    expect(preview.unchanged.map((s) => s.code)).toEqual(['PR_0010']);
    expect(preview.update.map((u) => [u.code, u.approved])).toEqual([
      ['PR_0020', true],
      ['PR_0030', false],
    ]);
    // 01:00:02:00–01:00:03:00 is 24 frames: cut out 1009 + 24 − 1 = 1032.
    expect(preview.update[0].to.last).toBe(1032);
  });
});
