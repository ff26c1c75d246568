// The table of what changed between two versions' scenes (rows from src/lib/review/diff), grouped by area.
import type { SceneChange } from '~/lib/review/diff';
import { versionLabel } from '~/lib/vocab';
import { fieldLabel } from '~/lib/scene/labels';

const AREA_WORDS: Record<string, string> = {
  document: 'Document',
  tank: 'Tank',
  timing: 'Timing',
  physics: 'Physics',
  liquids: 'Liquids',
  pours: 'Pours',
  spouts: 'Spouts',
  walls: 'Walls',
  props: 'Props',
  drains: 'Drains',
};
const KIND_WORDS: Record<SceneChange['kind'], string> = { changed: 'changed', added: 'new', removed: 'gone', moved: 'moved', reshaped: 'new shape' };
const KIND_TONE: Record<SceneChange['kind'], string> = {
  changed: 'bg-harbour-50 text-harbour-700',
  added: 'bg-foam-50 text-foam-600',
  removed: 'bg-coral-50 text-coral-700',
  moved: 'bg-sand-deep text-ink-soft',
  reshaped: 'bg-sand-deep text-ink-soft',
};

/** A change as a studio reads it: "Timing · end frame changed from 1040 to 1060", "Spout “jet” added". */
export function changeInWords(c: SceneChange): string {
  const what = fieldLabel(c.path);
  const small = (v: unknown) => (isPicture(c.path) ? valueText(c.path, v) : typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' ? show(v) : null);
  switch (c.kind) {
    case 'added':
      return `${what} added`;
    case 'removed':
      return `${what} removed`;
    case 'moved':
      return c.offset ? `${what.replace(/ · shape$/, '')} moved ${Number(c.offset[0].toFixed(3))} m across and ${Number(c.offset[1].toFixed(3))} m up` : `${what} moved`;
    case 'reshaped':
      return `${what.replace(/ · shape$/, '')} changed shape`;
    default: {
      const before = small(c.before);
      const after = small(c.after);
      return before !== null && after !== null ? `${what} changed from ${before} to ${after}` : `${what} changed`;
    }
  }
}

/** A prop's picture is an asset id: say which look it is ("picture 12", or its fill colour without one). */
const isPicture = (path: string) => /^props\[[^\]]*\]\.picture$/.test(path);
const valueText = (path: string, v: unknown): string => (isPicture(path) ? (v === undefined ? 'fill colour' : `picture ${show(v)}`) : show(v));

const metres = (n: number) => String(Number(n.toFixed(3)));

/** A shape in words ("rectangle 0.3 × 0.4 m at 0.1, 0.3 m"), or null when `v` is no shape. */
export function shapeInWords(v: unknown): string | null {
  if (typeof v !== 'object' || v === null) return null;
  const s = v as { type?: unknown; x?: number; y?: number; width?: number; height?: number; radius?: number; points?: unknown[] };
  if (s.type === 'rect' && [s.x, s.y, s.width, s.height].every((n) => typeof n === 'number')) return `rectangle ${metres(s.width!)} × ${metres(s.height!)} m at ${metres(s.x!)}, ${metres(s.y!)} m`;
  if (s.type === 'circle' && [s.x, s.y, s.radius].every((n) => typeof n === 'number')) return `circle of radius ${metres(s.radius!)} m at ${metres(s.x!)}, ${metres(s.y!)} m`;
  if (s.type === 'polygon' && Array.isArray(s.points)) return `polygon of ${s.points.length} points`;
  return null;
}

const show = (v: unknown): string => {
  if (v === undefined) return '—';
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)));
  // shapes, and whole items (added or removed) by their shape, in words rather than as the document's JSON
  const shape = shapeInWords(v) ?? (typeof v === 'object' && v !== null && 'shape' in v ? shapeInWords((v as { shape: unknown }).shape) : null);
  if (shape) return shape;
  const s = JSON.stringify(v, (_k, x) => (typeof x === 'number' && !Number.isInteger(x) ? Number(x.toPrecision(5)) : x));
  return s.length > 120 ? `${s.slice(0, 117)}…` : s;
};

export default function ChangeTable({ changes, counts, older, newer }: { changes: SceneChange[]; counts: Record<SceneChange['kind'], number>; older: number; newer: number }) {
  const summary = (Object.keys(counts) as SceneChange['kind'][]).filter((k) => counts[k] > 0).map((k) => `${counts[k]} ${KIND_WORDS[k]}`);
  return (
    <section className="card p-4" data-testid="change-table">
      <h2 className="text-lg font-semibold">
        What changed from {versionLabel(older)} to {versionLabel(newer)}
      </h2>
      <p className="mt-1 text-sm text-ink-soft">{changes.length === 0 ? 'The two scenes are the same.' : summary.join(' · ')}</p>
      {changes.length > 0 && (
        <div className="mt-3 overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-sand-line text-xs tracking-wide text-ink-muted uppercase">
              <tr>
                <th className="py-2 pr-3 font-medium">Area</th>
                <th className="py-2 pr-3 font-medium">What</th>
                <th className="py-2 pr-3 font-medium">Change</th>
                <th className="py-2 pr-3 font-medium">{versionLabel(older)}</th>
                <th className="py-2 font-medium">{versionLabel(newer)}</th>
              </tr>
            </thead>
            <tbody>
              {changes.map((c) => (
                <tr key={`${c.path}-${c.kind}`} className="border-b border-sand-line/60 align-top" data-testid="change-row" data-kind={c.kind} data-path={c.path}>
                  <td className="py-2 pr-3 whitespace-nowrap">{AREA_WORDS[c.area] ?? c.area}</td>
                  <td className="py-2 pr-3">{fieldLabel(c.path)}</td>
                  <td className="py-2 pr-3">
                    <span className={`rounded-full px-2 py-0.5 text-xs font-medium ${KIND_TONE[c.kind]}`}>{KIND_WORDS[c.kind]}</span>
                    <span className="mt-1 block text-xs text-ink-soft" data-testid="change-words">{changeInWords(c)}</span>
                  </td>
                  <td className="py-2 pr-3 font-mono text-xs break-all">{valueText(c.path, c.before)}</td>
                  <td className="py-2 font-mono text-xs break-all">{valueText(c.path, c.after)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
