// The "?" overlay: Tidemark's own keyboard map and the mouse gestures of the view.
import { SHORTCUTS } from '~/lib/editor/store';

export function HelpOverlay({ onClose }: { onClose(): void }) {
  return (
    <div role="dialog" aria-modal="true" aria-labelledby="help-title" className="fixed inset-0 z-40 grid place-items-center bg-ink/40 p-4" onClick={onClose} onKeyDown={(e) => e.key === 'Escape' && onClose()}>
      <div className="card max-h-[85vh] w-full max-w-lg overflow-auto p-5" onClick={(e) => e.stopPropagation()}>
        <div className="flex items-center justify-between">
          <h2 id="help-title" className="text-lg font-semibold">Keys and gestures</h2>
          <button type="button" className="btn-quiet px-3 py-1" onClick={onClose} autoFocus>Close</button>
        </div>
        <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
          {SHORTCUTS.map((s) => (
            <div key={s.keys} className="contents">
              <dt><kbd className="rounded border border-sand-line bg-sand px-1.5 py-0.5 font-mono text-xs">{s.keys}</kbd></dt>
              <dd className="text-ink-soft">{s.what}</dd>
            </div>
          ))}
          <div className="contents"><dt><kbd className="rounded border border-sand-line bg-sand px-1.5 py-0.5 font-mono text-xs">Wheel</kbd></dt><dd className="text-ink-soft">Zoom about the pointer</dd></div>
          <div className="contents"><dt><kbd className="rounded border border-sand-line bg-sand px-1.5 py-0.5 font-mono text-xs">Space + drag · middle drag</kbd></dt><dd className="text-ink-soft">Pan the view</dd></div>
          <div className="contents"><dt><kbd className="rounded border border-sand-line bg-sand px-1.5 py-0.5 font-mono text-xs">Shift + click</kbd></dt><dd className="text-ink-soft">Add to or remove from the selection; Shift while rotating snaps the angle to 15° steps (free without it)</dd></div>
          <div className="contents"><dt><kbd className="rounded border border-sand-line bg-sand px-1.5 py-0.5 font-mono text-xs">Enter · Backspace</kbd></dt><dd className="text-ink-soft">Polygon: finish · remove the last point (or click the first point, or double-click)</dd></div>
        </dl>
      </div>
    </div>
  );
}
