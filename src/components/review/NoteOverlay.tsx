// A transparent layer over the player's image: shows the point or stroke of each note on the current frame, and
// while armed lets the reviewer click a point or drag a rough stroke for the next note. Coordinates are
// plate-normalised (0..1 from the image's top-left), so marks land on the same spot at any player size.
import { useRef, useState, type PointerEvent } from 'react';
import { NOTE_LIMITS, type NoteMarker, type NotePoint } from '~/lib/review/notes';
import type { NoteMark } from './ReviewPanel';

export interface NoteOverlayProps {
  markers: NoteMarker[];
  currentFrame: number;
  /** The mark being drawn for the next note (shown dashed). */
  mark?: NoteMark | null;
  onMarkChange?: (mark: NoteMark | null) => void;
  /** While true, pointer input draws a mark instead of reaching the player. */
  armed?: boolean;
  /** The image's rectangle inside the overlay's box, in CSS pixels (defaults to the whole box). */
  rect?: { x: number; y: number; width: number; height: number } | null;
}

/** A drag shorter than this (as a fraction of the image's diagonal) counts as a click: a point. */
const CLICK = 0.01;

export default function NoteOverlay({ markers, currentFrame, mark, onMarkChange, armed = false, rect }: NoteOverlayProps) {
  const box = useRef<SVGSVGElement>(null);
  const [drawing, setDrawing] = useState<NotePoint[] | null>(null);
  const here = markers.filter((m) => m.frame === currentFrame && (m.point || m.stroke));

  const toUnit = (e: PointerEvent): NotePoint => {
    const r = box.current!.getBoundingClientRect();
    const clamp = (v: number) => Math.min(1, Math.max(0, v));
    return { x: clamp((e.clientX - r.left) / r.width), y: clamp((e.clientY - r.top) / r.height) };
  };
  const down = (e: PointerEvent<SVGSVGElement>) => {
    if (!armed) return;
    e.currentTarget.setPointerCapture(e.pointerId);
    setDrawing([toUnit(e)]);
  };
  const move = (e: PointerEvent<SVGSVGElement>) => {
    if (!drawing || drawing.length >= NOTE_LIMITS.maxStrokePoints) return;
    const p = toUnit(e);
    const last = drawing[drawing.length - 1];
    if (Math.hypot(p.x - last.x, p.y - last.y) > 0.004) setDrawing([...drawing, p]);
  };
  const up = () => {
    if (!drawing) return;
    const first = drawing[0];
    const far = drawing.some((q) => Math.hypot(q.x - first.x, q.y - first.y) > CLICK);
    onMarkChange?.(far && drawing.length >= 2 ? { stroke: drawing } : { point: first });
    setDrawing(null);
  };

  const style = rect ? { left: rect.x, top: rect.y, width: rect.width, height: rect.height } : { left: 0, top: 0, width: '100%', height: '100%' };
  const path = (pts: NotePoint[]) => pts.map((q, i) => `${i ? 'L' : 'M'}${q.x} ${q.y}`).join(' ');
  return (
    <svg
      ref={box}
      className={`absolute ${armed ? 'cursor-crosshair' : 'pointer-events-none'}`}
      style={style}
      viewBox="0 0 1 1"
      preserveAspectRatio="none"
      onPointerDown={down}
      onPointerMove={move}
      onPointerUp={up}
      data-testid="note-overlay"
      data-armed={armed ? 'true' : undefined}
      aria-hidden={!armed}
      role={armed ? 'application' : undefined}
      aria-label={armed ? 'Click a point or drag a stroke on the image for the next note' : undefined}
    >
      {here.map((m) =>
        m.point ? (
          <circle key={m.noteId} cx={m.point.x} cy={m.point.y} r={0.012} fill="none" stroke={m.resolved ? '#6fbfbb' : '#e0583d'} strokeWidth={3} vectorEffect="non-scaling-stroke" />
        ) : (
          <path key={m.noteId} d={path(m.stroke!)} fill="none" stroke={m.resolved ? '#6fbfbb' : '#e0583d'} strokeWidth={3} vectorEffect="non-scaling-stroke" strokeLinecap="round" strokeLinejoin="round" />
        ),
      )}
      {mark?.point && <circle cx={mark.point.x} cy={mark.point.y} r={0.012} fill="none" stroke="#fff" strokeDasharray="4 3" strokeWidth={2} vectorEffect="non-scaling-stroke" />}
      {mark?.stroke && <path d={path(mark.stroke)} fill="none" stroke="#fff" strokeDasharray="4 3" strokeWidth={2} vectorEffect="non-scaling-stroke" />}
      {drawing && <path d={path(drawing)} fill="none" stroke="#fff" strokeWidth={2} vectorEffect="non-scaling-stroke" />}
    </svg>
  );
}
