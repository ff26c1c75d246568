// Words of the shot activity and the compare table: what a studio reads instead of field names.
import { describe, it, expect } from 'vitest';
import { activityLine, shotFieldChange } from '../../src/lib/review/activity';
import { changeInWords, shapeInWords } from '../../src/components/review/ChangeTable';
import { diffScenes } from '../../src/lib/review/diff';
import { tinyScene } from '../support/scenes';

describe('activity words', () => {
  it('names a shot field as the form does, with its unit', () => {
    expect(shotFieldChange('plateWidth', { from: 1920, to: 2048 })).toBe('Plate width changed from 1920 to 2048 px');
    expect(shotFieldChange('headHandles', { from: 8, to: 12 })).toBe('Head handles changed from 8 to 12 frames');
    expect(shotFieldChange('dueDate', { from: null, to: '2027-01-15T00:00:00.000Z' })).toBe('Due date set to 2027-01-15');
    expect(shotFieldChange('description', { from: 'Crown splash', to: null })).toBe('Description cleared (was Crown splash)');
  });
  it('puts the actor in front, and a bake after its version', () => {
    expect(activityLine({ action: 'version.return', actorName: 'Ines Falk', detail: { comment: 'crown too tall' }, versionNumber: 2 })).toBe('Ines Falk sent v002 back for changes: “crown too tall”');
    expect(activityLine({ action: 'bake.failed', actorName: 'Tom Aro', detail: { error: 'out of memory' }, versionNumber: 4 })).toBe('The bake of v004 failed: out of memory (bake asked for by Tom Aro)');
    expect(activityLine({ action: 'shot.update', actorName: null, detail: { plateWidth: { from: 1920, to: 2048 } } })).toBe('Someone changed the details: Plate width changed from 1920 to 2048 px');
  });
  it('says where a shot came from, and who commented from outside the studio and how', () => {
    expect(activityLine({ action: 'shot.create', actorName: 'Ines Falk', detail: { code: 'PR_0010', importedFrom: 'edl' } })).toBe('Ines Falk created the shot from an edit list import');
    expect(activityLine({ action: 'shot.create', actorName: 'Ines Falk', detail: { code: 'PR_0010' } })).toBe('Ines Falk created the shot');
    expect(activityLine({ action: 'note.client', actorName: 'Mara Quist', detail: { frame: 1008 }, versionNumber: 2 })).toBe('Mara Quist commented on v002 at frame 1008 (client account)');
    // a guest on a share link has no account: the name they gave stands in front
    expect(activityLine({ action: 'share.note', actorName: null, detail: { guestName: 'Robin at the agency', frame: 1012 }, versionNumber: 3 })).toBe(
      'Robin at the agency commented on v003 at frame 1012 (share link)',
    );
  });
});

describe('compare change words', () => {
  it('says a timing change in the trade’s words, not the document path', () => {
    const a = tinyScene() as any;
    const b = structuredClone(a);
    b.timing.endFrame = a.timing.endFrame + 5;
    const rows = diffScenes(a, b);
    const end = rows.find((r) => r.path === 'timing.endFrame');
    expect(end).toBeDefined();
    expect(changeInWords(end!)).toBe(`Timing · end frame changed from ${a.timing.endFrame} to ${a.timing.endFrame + 5}`);
  });

  it('says a prop picture change as the look it is, not a bare asset id', () => {
    const prop = { id: 'can', shape: { type: 'rect', x: 0.2, y: 0.3, width: 0.05, height: 0.1 }, keys: [{ frame: 1001 }] };
    const a = { ...(tinyScene() as any), version: 2, props: [{ ...prop, picture: 12 }] };
    const b = { ...a, props: [prop] };
    const row = diffScenes(a, b).find((r) => r.path === 'props[can].picture');
    expect(row).toBeDefined();
    expect(changeInWords(row!)).toBe('Prop “can” · picture changed from picture 12 to fill colour');
  });
});

describe('shapes in the compare table', () => {
  it('reads a shape in metres, not as the document’s JSON', () => {
    expect(shapeInWords({ type: 'rect', x: 0.65, y: 0.3, width: 0.3, height: 0.4 })).toBe('rectangle 0.3 × 0.4 m at 0.65, 0.3 m');
    expect(shapeInWords({ type: 'circle', x: 0.2, y: 0.25, radius: 0.05 })).toBe('circle of radius 0.05 m at 0.2, 0.25 m');
    expect(shapeInWords({ type: 'polygon', points: [[0, 0], [1, 0], [0, 1]] })).toBe('polygon of 3 points');
    expect(shapeInWords({ gravity: [0, -9.81] })).toBeNull();
  });
});
