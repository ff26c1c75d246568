// The editor's keyboard map: frames step on ←/→ (Shift: ten) as in the player, F fits the tank.
// Common practice (no source): arrow keys step frames and Shift multiplies the step in editing and review tools.
import { describe, expect, it } from 'vitest';
import { actionForKey, SHORTCUTS } from '../../src/lib/editor/store';

describe('editor keys', () => {
  it('steps one frame on the arrows and ten with Shift', () => {
    expect(actionForKey('ArrowLeft', false, false)).toBe('frame-back');
    expect(actionForKey('ArrowRight', false, false)).toBe('frame-forward');
    expect(actionForKey('ArrowLeft', false, true)).toBe('frames-back');
    expect(actionForKey('ArrowRight', false, true)).toBe('frames-forward');
  });

  it('fits the view on F and leaves H, comma and full stop free', () => {
    expect(actionForKey('f', false, false)).toBe('fit');
    expect(actionForKey('F', false, true)).toBe('fit');
    expect(actionForKey('h', false, false)).toBeNull();
    expect(actionForKey(',', false, false)).toBeNull();
    expect(actionForKey('.', false, false)).toBeNull();
  });

  it('lists every action it answers in the help overlay', () => {
    const listed = new Set(SHORTCUTS.map((s) => s.action));
    for (const a of ['frame-back', 'frames-back', 'fit', 'play', 'undo', 'redo', 'save', 'help'] as const) expect(listed.has(a)).toBe(true);
  });
});
