// A shot's cut range and handles, shown the same way on every screen (shot table, shot page, player, import preview):
// cut in–cut out with its length, head and tail handles, and each end paired with its source timecode.
import { sourceTimecodeLabel, rateText, type SourceTimecodeShot } from '~/lib/timecode';
import { rangeLength } from './format';

export interface CutRangeShot extends SourceTimecodeShot {
  lastFrame: number;
  headHandles: number;
  tailHandles: number;
}

/** "head 8 · tail 8", or "no handles". */
export function handlesText(head: number, tail: number): string {
  return head || tail ? `head ${head} · tail ${tail}` : 'no handles';
}

/** Cut in–cut out (length), head/tail handles, and the source timecode of both ends beside their frame numbers. */
export function CutRange({ shot, testId = 'cut-range' }: { shot: CutRangeShot; testId?: string }) {
  const tc = (f: number) => sourceTimecodeLabel(shot, f, '—');
  return (
    <div className="leading-tight tabular-nums" data-testid={testId}>
      <span className="font-medium" data-testid={`${testId}-frames`} title="Cut in – cut out">
        {shot.firstFrame}–{shot.lastFrame}
      </span>{' '}
      <span className="text-xs text-ink-muted">
        {rangeLength(shot.firstFrame, shot.lastFrame)}f · {handlesText(shot.headHandles, shot.tailHandles)}
      </span>
      <div className="text-xs text-ink-muted" data-testid={`${testId}-source`} title={`Source timecode at ${rateText(shot.frameRate)}`}>
        {shot.firstFrame} · {tc(shot.firstFrame)} – {shot.lastFrame} · {tc(shot.lastFrame)}
      </div>
    </div>
  );
}
