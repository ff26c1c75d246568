// Note markers along a frame range: one tick per note thread, placed at its frame; clicking a tick seeks to it.
// Meant to sit right under the player's timeline, with the same width.
import type { NoteMarker } from '~/lib/review/notes';
import { frameWithTimecode, type SourceTimecodeShot } from '~/lib/timecode';

interface Props {
  markers: NoteMarker[];
  start: number;
  end: number;
  currentFrame: number;
  onSeek: (frame: number) => void;
  /** The shot's cut in, rate and source timecode at the cut in: each tick names its frame with its source timecode. */
  tcShot?: SourceTimecodeShot;
}

export default function NoteTicks({ markers, start, end, currentFrame, onSeek, tcShot }: Props) {
  const label = (frame: number) => (tcShot ? frameWithTimecode(tcShot, frame) : String(frame));
  const span = Math.max(1, end - start);
  return (
    <div className="relative h-4" data-testid="note-ticks" aria-label="Notes on the timeline">
      {markers.map((m) => (
        <button
          key={m.noteId}
          type="button"
          className={`absolute top-0 h-4 w-2 -translate-x-1/2 rounded-sm ${m.resolved ? 'bg-harbour-300' : 'bg-coral-500'} ${m.frame === currentFrame ? 'ring-2 ring-ink' : ''}`}
          style={{ left: `${((Math.min(end, Math.max(start, m.frame)) - start) / span) * 100}%` }}
          onClick={() => onSeek(m.frame)}
          title={`Note on frame ${label(m.frame)}`}
          aria-label={`Note on frame ${label(m.frame)}${m.resolved ? ' (done)' : ''}`}
          data-frame={m.frame}
        />
      ))}
    </div>
  );
}
