// The Liquids panel: the scene's liquids (name, colour, viscosity), starting values from the presets with where each
// value comes from, add and remove (never the last one, nor one a standing liquid or spout still uses, and it says
// why), and the one density every liquid shares. Changes go through the store as one undoable command each.
import { useEffect, useState } from 'react';
import type { EditorStore, EditorSnapshot } from '~/lib/editor/store';
import { setSection } from '~/lib/editor/commands';
import type { EditorDoc } from '~/lib/editor/document';
import { LIQUID_DENSITY } from '~/lib/editor/motion';
import { liquidFromPreset, liquidProblems, replaceLiquid, viscosityText, whyNotRemovable } from '~/lib/editor/liquids';
import { LIQUID_PRESETS } from '~/lib/scene/liquids';
import { VISCOSITY_RANGE, type Liquid } from '~/lib/scene/schema';
import { NumberField, Section } from './fields';

export function LiquidsPanel({ store, snap }: { store: EditorStore; snap: EditorSnapshot }) {
  const doc = snap.doc;
  const setLiquids = (liquids: Liquid[], label: string) => store.execute(setSection('liquids', liquids, label));
  return (
    <>
      <Section title="Liquids">
        <p className="rounded-md bg-harbour-50 px-2 py-1.5 text-[0.75rem] leading-snug text-harbour-900" data-testid="liquid-density">
          All liquids share one density: {LIQUID_DENSITY.toLocaleString('en-GB')} kg/m³ (water).
          <span className="block text-ink-muted">Viscosity changes how thickly a liquid flows, not how heavy it is.</span>
        </p>
        <ul className="mt-2 flex flex-col gap-2">
          {doc.liquids.map((l) => (
            <LiquidCard key={l.id} doc={doc} liquid={l} onChange={(next, label) => setLiquids(replaceLiquid(doc.liquids, l.id, next), label)}
              onRemove={() => setLiquids(doc.liquids.filter((x) => x.id !== l.id), `Remove liquid ${l.name}`)} />
          ))}
        </ul>
      </Section>
      <Section title="Add a liquid">
        <p className="mb-1.5 text-[0.7rem] leading-snug text-ink-muted">Starting values; change the name, colour and viscosity after adding.</p>
        <ul className="flex flex-col gap-1.5" data-testid="liquid-presets">
          {LIQUID_PRESETS.map((p) => (
            <li key={p.key} className="rounded-md border border-sand-line px-2 py-1.5">
              <div className="flex items-center gap-2">
                <span aria-hidden="true" className="h-3.5 w-3.5 shrink-0 rounded-full border border-ink/20" style={{ background: p.colour }} />
                <span className="text-[0.8rem] font-medium">{p.name}</span>
                <span className="text-[0.75rem] text-ink-soft tabular-nums">ν = {viscosityText(p.viscosity)}</span>
                <button type="button" className="btn-quiet ml-auto px-2 py-0.5 text-xs" aria-label={`Add ${p.name}`}
                  onClick={() => { const l = liquidFromPreset(doc, p); setLiquids([...doc.liquids, l], `Add liquid ${l.name}`); }}>Add</button>
              </div>
              <p className="mt-0.5 text-[0.65rem] leading-snug text-ink-muted">Source: {p.source}</p>
            </li>
          ))}
        </ul>
      </Section>
    </>
  );
}

function LiquidCard({ doc, liquid, onChange, onRemove }: { doc: EditorDoc; liquid: Liquid; onChange(next: Liquid, label: string): void; onRemove(): void }) {
  const [name, setName] = useState(liquid.name);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => { setName(liquid.name); setError(null); }, [liquid.name]);
  const commitName = () => {
    const next = { ...liquid, name: name.trim() };
    if (next.name === liquid.name) return;
    const problems = liquidProblems(next);
    if (problems.length) { setError(problems[0]); return; }
    setError(null);
    onChange(next, `Rename liquid ${liquid.name} to ${next.name}`);
  };
  const blocked = whyNotRemovable(doc, liquid.id);
  const preset = LIQUID_PRESETS.find((p) => p.viscosity === liquid.viscosity);
  return (
    <li className="rounded-md border border-sand-line p-2" data-testid={`liquid-${liquid.id}`}>
      <div className="flex items-center gap-2">
        <input type="color" aria-label={`Colour of ${liquid.name}`} value={liquid.colour.toLowerCase()} className="h-7 w-8 shrink-0 cursor-pointer rounded border border-sand-line bg-white p-0.5"
          onChange={(e) => onChange({ ...liquid, colour: e.target.value.toUpperCase() }, `Colour of ${liquid.name}`)} />
        <input aria-label="Liquid name" value={name} maxLength={80} onChange={(e) => setName(e.target.value)} onBlur={commitName} onKeyDown={(e) => e.key === 'Enter' && commitName()}
          className="min-w-0 flex-1 rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]" />
      </div>
      {error && <p className="mt-0.5 text-[0.7rem] text-coral-700" role="alert">{error}</p>}
      <NumberField label="Viscosity" unit="m²/s" value={liquid.viscosity} min={VISCOSITY_RANGE.min} max={VISCOSITY_RANGE.max} testId={`liquid-viscosity-${liquid.id}`}
        help={`${viscosityText(liquid.viscosity)}${preset ? ` (as ${preset.name.toLowerCase()})` : ''}. Water is 10⁻⁶; thicker liquids flow slower and splash less.`}
        onCommit={(viscosity) => onChange({ ...liquid, viscosity }, `Viscosity of ${liquid.name}`)} />
      <div className="flex items-center justify-between gap-2 py-1">
        <label htmlFor={`liquid-preset-${liquid.id}`} className="text-[0.75rem] text-ink-soft">Viscosity preset</label>
        <select id={`liquid-preset-${liquid.id}`} value={preset?.key ?? ''} className="rounded-md border border-sand-line bg-white px-1.5 py-0.5 text-[0.75rem]"
          onChange={(e) => { const p = LIQUID_PRESETS.find((x) => x.key === e.target.value); if (p) onChange({ ...liquid, viscosity: p.viscosity }, `Viscosity of ${liquid.name}: ${p.name}`); }}>
          {!preset && <option value="">your own value</option>}
          {LIQUID_PRESETS.map((p) => <option key={p.key} value={p.key}>{p.name} · {viscosityText(p.viscosity)}</option>)}
        </select>
      </div>
      <div className="mt-1 flex items-start justify-between gap-2 text-[0.7rem]">
        {blocked ? <span className="text-ink-muted" data-testid="liquid-keep-reason">{blocked}</span> : <span className="text-ink-muted">Not used yet.</span>}
        <button type="button" className="shrink-0 text-coral-700 hover:underline disabled:text-ink-muted/60 disabled:no-underline" disabled={blocked !== null}
          title={blocked ?? `Remove ${liquid.name}`} onClick={onRemove}>Remove</button>
      </div>
    </li>
  );
}
