// The frame ruler under the view: the scene's frame range in shot frames with the plate's source timecode, the current frame,
// how far the live preview has computed, each spout's active frames and each prop's impact frame. Click or drag to scrub.
import { useRef } from 'react';
import type { EditorDoc } from '~/lib/editor/document';
import { sourceTimecodeLabel, type SourceTimecodeShot } from '~/lib/timecode';
import { impactFrameOf, surfaceHeightAt } from '~/lib/editor/timing';
import { shapeCentroid } from '~/lib/scene/shapes';

interface Props {
  doc: EditorDoc;
  frame: number;
  /** The shot's cut in, rate and source timecode at the cut in: every frame is shown with its source timecode. */
  shot: SourceTimecodeShot;
  computedTo: number | null;
  onFrame(frame: number): void;
}

export function Ruler({ doc, frame, shot, computedTo, onFrame }: Props) {
  const timecodeOf = (f: number) => sourceTimecodeLabel(shot, f, '—');
  const ref = useRef<HTMLDivElement>(null);
  const { startFrame: a, endFrame: b } = doc.timing;
  const span = Math.max(1, b - a);
  const pos = (f: number) => `${((f - a) / span) * 100}%`;
  const pick = (clientX: number) => {
    const r = ref.current!.getBoundingClientRect();
    onFrame(Math.round(a + ((clientX - r.left) / r.width) * span));
  };
  const every = [1, 2, 5, 10, 20, 25, 50, 100, 200, 500].find((s) => span / s <= 24) ?? 1000;
  const ticks: number[] = [];
  for (let f = Math.ceil(a / every) * every; f <= b; f += every) ticks.push(f);
  const impacts = doc.props.flatMap((p) => {
    const surface = surfaceHeightAt(doc, shapeCentroid(p.shape)[0]);
    if (surface === null || p.keys.length < 2) return [];
    const f = impactFrameOf(p, surface, a, b);
    return f === null || f === p.keys[0].frame ? [] : [{ id: p.id, frame: f }];
  });
  return (
    <div className="select-none px-3 pt-1 pb-2">
      <div className="flex items-baseline justify-between text-[0.75rem] tabular-nums text-ink-soft">
        <span>Frame <strong className="text-ink" data-testid="current-frame">{frame}</strong> · <span data-testid="current-timecode">{timecodeOf(frame)}</span></span>
        <span className="text-ink-muted">{a}–{b} · {timecodeOf(a)} – {timecodeOf(b)}</span>
      </div>
      <div
        ref={ref}
        role="slider"
        tabIndex={0}
        aria-label="Shot frame"
        aria-valuemin={a}
        aria-valuemax={b}
        aria-valuenow={frame}
        aria-valuetext={`frame ${frame}, ${timecodeOf(frame)}`}
        data-testid="frame-ruler"
        className="relative mt-1 h-10 cursor-pointer rounded-md border border-sand-line bg-white"
        onPointerDown={(e) => { (e.target as HTMLElement).setPointerCapture(e.pointerId); pick(e.clientX); }}
        onPointerMove={(e) => { if (e.buttons & 1) pick(e.clientX); }}
      >
        {computedTo !== null && <div className="absolute inset-y-0 left-0 rounded-l-md bg-harbour-50" style={{ width: pos(computedTo) }} title="Preview computed" />}
        {doc.spouts.map((s, i) => (
          <div key={s.id} className="absolute h-1.5 rounded-full bg-[#7fe3f0]" style={{ left: pos(s.startFrame), width: `calc(${pos(s.endFrame)} - ${pos(s.startFrame)})`, top: 4 + (i % 3) * 3 }} title={`${s.id} active ${s.startFrame}–${s.endFrame}`} />
        ))}
        {ticks.map((f) => (
          <div key={f} className="absolute bottom-0 h-2 w-px bg-ink-muted/60" style={{ left: pos(f) }}>
            <span className={`absolute -top-3.5 text-[0.6rem] text-ink-muted tabular-nums ${f === b ? '-translate-x-full' : f === a ? '' : '-translate-x-1/2'}`}>{f}</span>
          </div>
        ))}
        {impacts.map((m) => (
          <div key={m.id} className="absolute top-0 bottom-0 w-0.5 bg-coral-500" style={{ left: pos(m.frame) }} title={`${m.id} hits the liquid on ${m.frame}`} data-testid="impact-marker" data-frame={m.frame}>
            <span className="absolute top-0.5 left-1 rounded bg-coral-500 px-1 text-[0.6rem] whitespace-nowrap text-white">{m.id} hits {m.frame}</span>
          </div>
        ))}
        <div className="absolute -top-0.5 -bottom-0.5 w-0.5 bg-harbour-700" style={{ left: pos(frame) }} />
      </div>
    </div>
  );
}
