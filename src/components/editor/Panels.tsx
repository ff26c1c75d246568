// The editor's side panels: the Inspector (the selected item's numbers, a spout's aim and frames, a prop's keys and the
// timing helper) and the Parameters panel (tank, frame range, physics with units and explanations, physics presets).
// Both read the same document as the view and change it only through the store's commands.
import { useState } from 'react';
import type { EditorStore, EditorSnapshot } from '~/lib/editor/store';
import { GROUP_LABEL, withCellSize, cellsNote, type AnyItem, type ItemRef } from '~/lib/editor/document';
import { setSection, replaceDocument } from '~/lib/editor/commands';
import { PARAMS, PHYSICS_PRESETS, applyPreset, readPath, sectionWith, type ParamSpec } from '~/lib/editor/params';
import { planDrop, surfaceHeightAt, impactFrameOf } from '~/lib/editor/timing';
import { tankCells, PROP_DENSITY_RANGE } from '~/lib/scene/schema';
import { shapeCentroid } from '~/lib/scene/shapes';
import type { ShapeDoc } from '~/lib/scene/schema';
import { jumpWarning } from '~/lib/editor/key-jump';
import { FIRST_FREE_DENSITY, densityHint, motionProblems, withDensity, withLaunch, withMotion, withRelease } from '~/lib/editor/motion';
import { NumberField, Section } from './fields';

const r6 = (v: number) => Math.round(v * 1e6) / 1e6;

export function Inspector({ store, snap }: { store: EditorStore; snap: EditorSnapshot }) {
  if (snap.selection.length === 0) {
    return (
      <Section title="Selection">
        <p className="text-[0.8rem] leading-relaxed text-ink-muted">Nothing selected. Pick an item with the Pick tool (1), or draw one with Pour, Spout, Wall, Prop or Drain.</p>
      </Section>
    );
  }
  if (snap.selection.length > 1) {
    return (
      <Section title="Selection">
        <p className="text-[0.8rem] text-ink-soft">{snap.selection.length} items selected: drag to move them together, Ctrl+D to duplicate, Delete to remove.</p>
      </Section>
    );
  }
  const sel = store.selectedItem();
  if (!sel) return null;
  return <ItemInspector key={`${sel.ref.group}:${sel.ref.id}`} store={store} snap={snap} refItem={sel.ref} item={sel.item} />;
}

function ItemInspector({ store, snap, refItem, item }: { store: EditorStore; snap: EditorSnapshot; refItem: ItemRef; item: AnyItem }) {
  const [idText, setIdText] = useState(item.id);
  const [idError, setIdError] = useState<string | null>(null);
  const put = (next: AnyItem, label?: string) => store.updateItem(refItem, next, label);
  const setShape = (shape: ShapeDoc) => put({ ...item, shape } as AnyItem, `Edit ${item.id} shape`);
  const rename = () => {
    const id = idText.trim();
    if (id === item.id) return;
    if (!id || id.length > 64) { setIdError('1 to 64 characters'); return; }
    const taken = ['pours', 'spouts', 'walls', 'props', 'drains'].some((g) => (snap.doc[g as 'pours'] as AnyItem[]).some((it) => it.id === id));
    if (taken) { setIdError('Already used in this scene'); return; }
    setIdError(null);
    put({ ...item, id } as AnyItem, `Rename ${item.id} to ${id}`);
  };
  const s = item.shape;
  return (
    <>
      <Section title={`${GROUP_LABEL[refItem.group]} · ${s.type === 'rect' ? 'rectangle' : s.type}`}>
        <div className="flex items-center justify-between gap-2 py-1">
          <label htmlFor="item-id" className="text-[0.8rem] font-medium">Name</label>
          <input id="item-id" value={idText} onChange={(e) => setIdText(e.target.value)} onBlur={rename} onKeyDown={(e) => e.key === 'Enter' && rename()}
            className="w-40 rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]" />
        </div>
        {idError && <p className="text-[0.7rem] text-coral-700">{idError}</p>}
        {s.type === 'rect' && (
          <>
            <NumberField label="Left (x)" unit="m" value={s.x} onCommit={(x) => setShape({ ...s, x })} compact />
            <NumberField label="Bottom (y)" unit="m" value={s.y} onCommit={(y) => setShape({ ...s, y })} compact />
            <NumberField label="Width" unit="m" value={doc.tank.width} min={2 * doc.tank.cellSize} help={cellsNote(doc.tank.width, doc.tank.cellSize)} onCommit={(w) => set('tank.width', w, 'Tank width')} testId="tank-width" />
        <NumberField label="Height" unit="m" value={doc.tank.height} min={2 * doc.tank.cellSize} help={cellsNote(doc.tank.height, doc.tank.cellSize)} onCommit={(h) => set('tank.height', h, 'Tank height')} testId="tank-height" />
        <NumberField label="Cell size" unit="m" value={doc.tank.cellSize} min={cellSpec.min} max={Math.min(cellSpec.max ?? Infinity, doc.tank.width / 2, doc.tank.height / 2)} help={cellSpec.help} onCommit={setCell} testId="param-tank.cellSize" />
        <p className="text-[0.7rem] leading-snug text-ink-muted">Grid spacing of the bake: finer shows smaller drops and costs more.</p>
        <fieldset className="mt-1.5">
          <legend className="text-[0.8rem] font-medium">Solid sides</legend>
          <div className="mt-1 flex flex-wrap gap-3 text-[0.75rem]">
            {(['left', 'right', 'bottom', 'top'] as const).map((k) => (
              <label key={k} className="flex items-center gap-1">
                <input type="checkbox" checked={sides[k]} onChange={(e) => store.execute(setSection('tank', { ...doc.tank, sides: { ...sides, [k]: e.target.checked } }, `${k} side ${e.target.checked ? 'solid' : 'open'}`))} /> {k}
              </label>
            ))}
          </div>
          <p className="mt-0.5 text-[0.7rem] text-ink-muted">An open side lets liquid leave the tank.</p>
        </fieldset>
      </Section>
      <Section title="Frames">
        <NumberField label="First frame" unit="frame" integer value={doc.timing.startFrame} max={doc.timing.endFrame} onCommit={(v) => set('timing.startFrame', v, 'First frame')} />
        <NumberField label="Last frame" unit="frame" integer value={doc.timing.endFrame} min={doc.timing.startFrame} onCommit={(v) => set('timing.endFrame', v, 'Last frame')} />
        <p className="text-[0.7rem] text-ink-muted">{+doc.timing.fps.toFixed(3)} frames per second, from the shot.</p>
      </Section>
      <Section title="Physics">
        {PARAMS.filter((p) => p.path !== 'tank.cellSize' && !p.advanced).map(paramField)}
        <details className="mt-2 rounded-md border border-sand-line px-2 py-1" data-testid="advanced-physics">
          <summary className="cursor-pointer text-[0.8rem] font-medium">Advanced: solver settings for FX TDs</summary>
          <div className="flex items-center justify-between py-1">
            <label htmlFor="pressure-solver" className="text-[0.8rem] font-medium">Pressure solver</label>
            <select id="pressure-solver" value={doc.physics.pressureSolver} onChange={(e) => set('physics.pressureSolver', e.target.value, 'Pressure solver')} className="rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]">
              <option value="pcg-mic0">Conjugate gradient (MIC)</option>
              <option value="gauss-seidel">Gauss–Seidel</option>
            </select>
          </div>
          <p className="text-[0.7rem] leading-snug text-ink-muted">Conjugate gradient reaches the tolerance in fewer, costlier steps and is the faster default.</p>
          {PARAMS.filter((p) => p.advanced).map(paramField)}
        </details>
      </Section>
    </>
  );
}

