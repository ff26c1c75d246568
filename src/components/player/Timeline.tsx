// The timeline ruler: shot frame numbers with ticks, the in/out range shaded, the playhead; drag to scrub.
import { useRef, type PointerEvent as ReactPointerEvent, type KeyboardEvent } from 'react';
import { sourceTimecodeLabel, type SourceTimecodeShot } from '~/lib/timecode';

interface Props {
  start: number;
  end: number;
  frame: number;
  inFrame: number;
  outFrame: number;
  /** The shot's frame range (handles outside it are drawn dimmed). */
  shotFirst: number;
  shotLast: number;
  /** The frames the bake holds (the rest of the timeline is marked as not baked; scrubbing stays inside them). */
  bakedStart?: number;
  bakedEnd?: number;
  /** Labels frames with their source timecode (the shot's cut in, rate and source timecode at the cut in). */
  tcShot: SourceTimecodeShot;
  onScrub: (frame: number) => void;
  onScrubEnd?: () => void;
}

/** A tick step (1, 2, 5, 10, 20, 50 …) giving labels at least `minPx` apart. */
function niceStep(frames: number, widthPx: number, minPx: number): number {
  const perFrame = widthPx / Math.max(1, frames);
  for (const base of [1, 2, 5]) {
    for (let mag = 1; mag <= 100000; mag *= 10) {
      if (base * mag * perFrame >= minPx) return base * mag;
    }
  }
  return frames;
}

export default function Timeline({ start, end, frame, inFrame, outFrame, shotFirst, shotLast, bakedStart = start, bakedEnd = end, tcShot, onScrub, onScrubEnd }: Props) {
  const ref = useRef<HTMLDivElement>(null);
  const dragging = useRef(false);
  const count = end - start + 1;
  const pct = (f: number) => ((f - start) / count) * 100;
  const width = ref.current?.clientWidth ?? 800;
  const labelStep = niceStep(count, width, 56);
  const tickStep = Math.max(1, niceStep(count, width, 8));

  const frameAtX = (clientX: number) => {
    const r = ref.current!.getBoundingClientRect();
    const u = (clientX - r.left) / r.width;
    return Math.max(start, Math.min(end, start + Math.floor(u * count)));
  };
  const down = (e: ReactPointerEvent<HTMLDivElement>) => {
    if (e.button !== 0) return;
    dragging.current = true;
    e.currentTarget.setPointerCapture(e.pointerId);
    e.currentTarget.focus();
    onScrub(frameAtX(e.clientX));
  };
  const move = (e: ReactPointerEvent<HTMLDivElement>) => {
    if (dragging.current) onScrub(frameAtX(e.clientX));
  };
  const up = (e: ReactPointerEvent<HTMLDivElement>) => {
    if (!dragging.current) return;
    dragging.current = false;
    e.currentTarget.releasePointerCapture(e.pointerId);
    onScrubEnd?.();
  };
  const key = (e: KeyboardEvent<HTMLDivElement>) => {
    if (e.key === 'PageUp' || e.key === 'PageDown') {
      e.preventDefault();
      e.stopPropagation();
      onScrub(Math.max(start, Math.min(end, frame + (e.key === 'PageUp' ? 10 : -10))));
    }
  };

  const ticks: number[] = [];
  const first = Math.ceil(start / tickStep) * tickStep;
  for (let f = first; f <= end; f += tickStep) ticks.push(f);

  return (
    <div
      ref={ref}
      role="slider"
      tabIndex={0}
      aria-label="Timeline"
      aria-valuemin={start}
      aria-valuemax={end}
      aria-valuenow={frame}
      aria-valuetext={`Frame ${frame}, ${sourceTimecodeLabel(tcShot, frame, '—')}`}
      data-testid="timeline"
      className="relative h-12 cursor-ew-resize touch-none rounded-md bg-ink select-none"
      onPointerDown={down}
      onPointerMove={move}
      onPointerUp={up}
      onPointerCancel={up}
      onKeyDown={key}
    >
      {/* Handles outside the shot's range, dimmed. */}
      {shotFirst > start && <div className="absolute inset-y-0 left-0 bg-black/35" style={{ width: `${pct(Math.min(end + 1, shotFirst))}%` }} />}
      {shotLast < end && <div className="absolute inset-y-0 right-0 bg-black/35" style={{ left: `${pct(Math.max(start, shotLast + 1))}%` }} />}
      {/* Frames of the cut and its handles the bake does not hold. */}
      {bakedStart > start && <div className="absolute inset-y-0 left-0 bg-[repeating-linear-gradient(135deg,transparent_0_4px,rgba(255,255,255,0.08)_4px_8px)]" style={{ width: `${pct(Math.min(end + 1, bakedStart))}%` }} title="Not baked" data-testid="timeline-unbaked" />}
      {bakedEnd < end && <div className="absolute inset-y-0 right-0 bg-[repeating-linear-gradient(135deg,transparent_0_4px,rgba(255,255,255,0.08)_4px_8px)]" style={{ left: `${pct(Math.max(start, bakedEnd + 1))}%` }} title="Not baked" data-testid="timeline-unbaked" />}
      {/* In/out range. */}
      <div
        className="absolute top-0 h-1.5 rounded-sm bg-harbour-300"
        style={{ left: `${pct(inFrame)}%`, width: `${((outFrame - inFrame + 1) / count) * 100}%` }}
        aria-hidden="true"
      />
      {ticks.map((f) => {
        const labelled = f % labelStep === 0;
        return (
          <div key={f} className="pointer-events-none absolute bottom-0" style={{ left: `${pct(f)}%` }} aria-hidden="true">
            <div className={`w-px ${labelled ? 'h-4 bg-sand/70' : 'h-2 bg-sand/35'}`} />
            {labelled && <span className="absolute bottom-4 left-1 text-[10px] leading-none text-sand/80 tabular-nums">{f}</span>}
          </div>
        );
      })}
      <div className="pointer-events-none absolute inset-y-0" style={{ left: `${pct(frame)}%`, width: `${100 / count}%` }} aria-hidden="true">
        <div className="absolute inset-y-0 left-0 w-full min-w-[2px] bg-coral-500/90" />
      </div>
    </div>
  );
}
