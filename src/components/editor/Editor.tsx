// The blocking editor island: the scene view over the plate with its tools, the frame ruler, the live preview, the
// Inspector and Parameters panels, save as version, unsaved work kept per shot, and the previs caution.
import { useCallback, useEffect, useMemo, useRef, useState, useSyncExternalStore, type ReactElement } from 'react';
import { EditorStore, actionForKey, type SnapMode } from '~/lib/editor/store';
import { SHAPE_MODES, type ShapeMode, type ToolId } from '~/lib/editor/tools';
import { addItem, replaceDocument } from '~/lib/editor/commands';
import { makeItem } from '~/lib/editor/document';
import { decodePng } from '~/lib/editor/png';
import { maskFromImage, traceMatte } from '~/lib/editor/matte';
import { keepDraft, readDraft, dropDraft, type StoredDraft } from '~/lib/editor/drafts';
import { previewScene, PREVIEW_FACTORS } from '~/lib/editor/preview';
import { tankCells } from '~/lib/scene/schema';
import { RENDER_LOOKS, LOOK_LABELS, type RenderLook } from '~/lib/render/looks';
import type { Vec } from '~/lib/editor/geometry';
import { PreviewController } from './preview-controller';
import { PictureShelf } from './picture-shelf';
import { Viewport, type PlateInfo, type ViewControls } from './Viewport';
import { Inspector, ParamsPanel } from './Panels';
import { LiquidsPanel } from './LiquidsPanel';
import { Ruler } from './Ruler';
import { SavePanel } from './SavePanel';
import { HelpOverlay } from './HelpOverlay';
import type { EditorBoot } from './types';
import { versionLabel } from '~/lib/vocab';
import { plateStartFrame } from '~/lib/plate';

const TOOLS: { id: ToolId; label: string; key: string; what: string; icon: ReactElement }[] = [
  { id: 'select', label: 'Pick', key: '1', what: 'Select, move, resize, rotate', icon: <path d="M5 3l10 6-4.5 1.2L13 15l-2 1-2.4-4.8L5 14z" fill="currentColor" /> },
  { id: 'pour', label: 'Standing liquid', key: '2', what: 'Liquid standing in the tank at the first frame', icon: <path d="M3 12c2-2 4 2 7 0s5 2 7 0v5H3z" fill="currentColor" /> },
  { id: 'spout', label: 'Spout', key: '3', what: 'Emitter over frames', icon: <g fill="currentColor"><rect x="2" y="7" width="6" height="5" rx="1" /><path d="M9 9.5h7M13 7l3 2.5-3 2.5" stroke="currentColor" strokeWidth="1.6" fill="none" /></g> },
  { id: 'wall', label: 'Wall', key: '4', what: 'Static solid', icon: <g fill="currentColor"><rect x="3" y="4" width="6" height="4" /><rect x="11" y="4" width="6" height="4" /><rect x="6" y="10" width="8" height="4" /><rect x="3" y="10" width="2" height="4" /><rect x="15" y="10" width="2" height="4" /></g> },
  { id: 'prop', label: 'Prop', key: '5', what: 'Moving solid with keys', icon: <g><rect x="7" y="2" width="6" height="6" fill="currentColor" /><path d="M10 9v7M7 13l3 3 3-3" stroke="currentColor" strokeWidth="1.6" fill="none" /></g> },
  { id: 'drain', label: 'Drain', key: '6', what: 'Removes liquid', icon: <g><rect x="3" y="11" width="14" height="5" fill="none" stroke="currentColor" strokeWidth="1.6" /><path d="M6 11v5M10 11v5M14 11v5M10 3v6M7.5 6.5L10 9l2.5-2.5" stroke="currentColor" strokeWidth="1.4" fill="none" /></g> },
  { id: 'tank', label: 'Tank', key: '7', what: 'Drag to size the tank', icon: <path d="M3 4v12h14V4" stroke="currentColor" strokeWidth="1.8" fill="none" /> },
];

const MODE_LABEL: Record<ShapeMode, string> = { rect: 'Rectangle', ellipse: 'Ellipse', circle: 'Circle', polygon: 'Polygon', brush: 'Brush' };

export default function Editor({ boot }: { boot: EditorBoot }) {
  const store = useMemo(() => new EditorStore(boot.scene), [boot]);
  const snap = useSyncExternalStore(store.subscribe, store.getSnapshot, store.getSnapshot);
  const preview = useMemo(() => new PreviewController((f) => store.setFrame(f), () => store.snapshot.frame), [store]);
  const pv = useSyncExternalStore(preview.subscribe, preview.getSnapshot, preview.getSnapshot);
  const viewRef = useRef<ViewControls | null>(null);
  const pictures = useMemo(() => new PictureShelf(boot.studio.id), [boot]);
  // The view draws the scene's prop pictures: list them once at the start when any prop names one.
  useEffect(() => {
    if (store.doc.props.some((p) => p.picture !== undefined)) void pictures.load();
  }, [store, pictures]);
  const [panel, setPanel] = useState<'inspector' | 'liquids' | 'params'>('inspector');
  const [look, setLook] = useState<RenderLook>('surface');
  const [showPreview, setShowPreview] = useState(true);
  const [help, setHelp] = useState(false);
  const [saving, setSaving] = useState(false);
  const [cursor, setCursor] = useState<Vec | null>(null);
  const [savedRevision, setSavedRevision] = useState(0);
  const [offer, setOffer] = useState<StoredDraft | null>(null);
  const [notice, setNotice] = useState<string | null>(boot.loadNote);
  const [lastSaved, setLastSaved] = useState<{ id: number; number: number } | null>(boot.startedFrom);
  const matteInput = useRef<HTMLInputElement>(null);
  const shotId = boot.shot.id;
  const dirty = snap.revision !== savedRevision;

  useEffect(() => () => preview.dispose(), [preview]);
  // The Pick tool hits free props where the view draws them: at the preview's solved pose while it is shown.
  useEffect(() => {
    store.confirm = (question) => window.confirm(question);
    store.solvedPropsAt = (f) => (showPreview && preview.snapshot.status !== 'off' ? preview.frameAt(f)?.props ?? null : null);
  }, [store, preview, showPreview]);
  // A read-only handle for browser tests and debugging in the console: the document, preview frames, page positions.
  useEffect(() => {
    (window as unknown as { tidemarkEditor?: unknown }).tidemarkEditor = {
      doc: () => store.doc,
      frame: () => store.snapshot.frame,
      previewFrame: (f: number) => { const p = preview.frameAt(f); return p && { count: p.count, x: Array.from(p.x), y: Array.from(p.y) }; },
      toClient: (x: number, y: number) => viewRef.current?.toClient(x, y) ?? null,
    };
  }, [store, preview]);

  // Unsaved work: offered back on return, kept (debounced) while editing, dropped on save.
  useEffect(() => {
    const d = readDraft(localStorage, shotId);
    if (d && JSON.stringify(d.scene) !== JSON.stringify(boot.scene)) setOffer(d);
  }, [shotId, boot.scene]);
  useEffect(() => {
    if (!dirty) return;
    const t = setTimeout(() => keepDraft(localStorage, shotId, { scene: store.doc, savedAt: Date.now(), baseVersionId: lastSaved?.id ?? null }), 400);
    return () => clearTimeout(t);
  }, [snap.revision, dirty, shotId, store, lastSaved]);
  useEffect(() => {
    const flush = () => { if (store.history.revision !== savedRevision) keepDraft(localStorage, shotId, { scene: store.doc, savedAt: Date.now(), baseVersionId: lastSaved?.id ?? null }); };
    window.addEventListener('pagehide', flush);
    return () => window.removeEventListener('pagehide', flush);
  }, [store, shotId, savedRevision, lastSaved]);

  const plate: PlateInfo | null = useMemo(() => {
    if (!boot.plate) return null;
    const mpp = boot.shot.metresPerPixel && boot.shot.metresPerPixel > 0 ? boot.shot.metresPerPixel : boot.scene.tank.width / boot.plate.width;
    return { url: boot.plate.url, contentType: boot.plate.contentType, width: boot.plate.width, height: boot.plate.height, metresPerPixel: mpp };
  }, [boot]);

  const togglePreview = useCallback(() => preview.toggle(store.doc, store.history.revision), [preview, store]);
  const restartPreview = useCallback(() => preview.start(store.doc, store.history.revision), [preview, store]);

  // Keyboard: the active tool first (polygon keys), then Tidemark's own map (SHORTCUTS).
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement | null;
      if (t && (/^(INPUT|TEXTAREA|SELECT)$/.test(t.tagName) || t.isContentEditable)) return;
      if (help || saving) { if (e.key === 'Escape') { setHelp(false); setSaving(false); } return; }
      if (!e.ctrlKey && !e.metaKey && store.toolKey(e.key)) { e.preventDefault(); return; }
      const action = actionForKey(e.key, e.ctrlKey || e.metaKey, e.shiftKey);
      if (!action) return;
      e.preventDefault();
      if (action.startsWith('tool:')) { store.setTool(action.slice(5) as ToolId); return; }
      switch (action) {
        case 'undo': store.undo(); break;
        case 'redo': store.redo(); break;
        case 'delete': store.deleteSelection(); break;
        case 'duplicate': store.duplicateSelection(); break;
        case 'help': setHelp(true); break;
        case 'play': togglePreview(); break;
        case 'restart': restartPreview(); break;
        case 'frame-back': store.setFrame(store.snapshot.frame - 1); break;
        case 'frame-forward': store.setFrame(store.snapshot.frame + 1); break;
        case 'frames-back': store.setFrame(store.snapshot.frame - 10); break;
        case 'frames-forward': store.setFrame(store.snapshot.frame + 10); break;
        case 'snap': store.setSnap(({ grid: 'cells', cells: 'off', off: 'grid' } as const)[store.snapshot.snap]); break;
        case 'fit': viewRef.current?.fit(); break;
        case 'save': setSaving(true); break;
        case 'escape': store.cancelTool(); store.select([]); break;
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [store, help, saving, togglePreview, restartPreview]);

  const importMatte = async (file: File) => {
    try {
      const img = decodePng(new Uint8Array(await file.arrayBuffer()));
      const widthMetres = plate ? plate.width * plate.metresPerPixel : store.doc.tank.width;
      const points = traceMatte(maskFromImage(img), { metresPerPixel: widthMetres / img.width, originX: 0, originY: 0, maxPoints: 400 });
      if (!points) { setNotice(`${file.name} has no white area to trace (white is solid).`); return; }
      const item = makeItem(store.doc, 'walls', { type: 'polygon', points });
      store.execute(addItem('walls', item));
      store.select([{ group: 'walls', id: item.id }]);
      setNotice(`Traced ${file.name} into ${item.id} (${points.length} points), placed over the ${plate ? 'plate' : 'tank'}.`);
    } catch (err) {
      setNotice(`Could not read ${file.name}: ${(err as Error).message}`);
    }
  };

  const onCursor = useCallback((p: Vec | null) => setCursor(p), []);
  const previewDoc = previewScene(snap.doc, pv.factor);
  const previewCells = tankCells(previewDoc.tank);
  const stale = pv.status !== 'off' && pv.revision !== snap.revision;
  const shapeTool = snap.tool !== 'select' && snap.tool !== 'tank' ? (snap.tool as keyof typeof SHAPE_MODES) : null;

  return (
    <div className="flex flex-col gap-3" data-testid="editor">
      <p className="rounded-lg border border-coral-100 bg-coral-50 px-3.5 py-2 text-[0.8rem] leading-relaxed text-coral-700" data-testid="previs-caution">
        <strong className="font-semibold">Previs, not a plan.</strong> This preview shows how a splash may look on screen, not how real liquids, rigs or people behave on set.
        Plan any practical water work with your licensed special-effects coordinator and follow local codes.
      </p>

      <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <div className="min-w-0">
          <p className="text-xs font-medium tracking-wide text-harbour-600 uppercase">Blocking</p>
          <h1 className="text-2xl font-semibold tracking-tight">{boot.shot.code}</h1>
        </div>
        <p className="text-sm text-ink-muted">
          {lastSaved ? `From ${versionLabel(lastSaved.number)}` : 'New scene'}
          {dirty ? ' · unsaved changes' : ''}
        </p>
        <div className="ml-auto flex items-center gap-2">
          <button type="button" className="btn-quiet px-3 py-1.5" onClick={() => store.undo()} disabled={!snap.canUndo} title={snap.undoLabel ? `Undo ${snap.undoLabel} (Ctrl+Z)` : 'Undo (Ctrl+Z)'}>Undo</button>
          <button type="button" className="btn-quiet px-3 py-1.5" onClick={() => store.redo()} disabled={!snap.canRedo} title={snap.redoLabel ? `Redo ${snap.redoLabel} (Ctrl+Shift+Z)` : 'Redo (Ctrl+Shift+Z)'}>Redo</button>
          <button type="button" className="btn-quiet px-3 py-1.5" onClick={() => setHelp(true)} aria-label="Keys and gestures (?)">?</button>
          <button type="button" className="btn-primary px-4 py-1.5" onClick={() => setSaving(true)}>Save version…</button>
        </div>
      </div>

      {notice && (
        <div role="status" className="flex items-center gap-3 rounded-lg border border-sand-line bg-paper px-3.5 py-2 text-sm text-ink-soft">
          <span className="flex-1">{notice}</span>
          <button type="button" className="text-xs text-ink-muted hover:text-ink" onClick={() => setNotice(null)}>Dismiss</button>
        </div>
      )}

      <div className="card flex h-[680px] min-h-0 overflow-hidden">
        {/* Tools */}
        <nav aria-label="Tools" className="flex w-16 shrink-0 flex-col gap-1 border-r border-sand-line bg-sand/60 p-1.5">
          {TOOLS.map((t) => (
            <button key={t.id} type="button" aria-pressed={snap.tool === t.id} title={`${t.label} (${t.key}): ${t.what}`} onClick={() => store.setTool(t.id)}
              className="flex flex-col items-center gap-0.5 rounded-lg px-1 py-1.5 text-[0.7rem] font-medium text-ink-soft hover:bg-sand-deep aria-pressed:bg-harbour-500 aria-pressed:text-white">
              <svg width="20" height="20" viewBox="0 0 20 20" aria-hidden="true">{t.icon}</svg>
              {t.label}
            </button>
          ))}
        </nav>

        {/* View, options, ruler, preview */}
        <div className="flex min-h-0 min-w-0 flex-1 flex-col">
          <div className="flex min-h-10 flex-wrap items-center gap-2 border-b border-sand-line px-3 py-1.5 text-[0.8rem]">
            {shapeTool && (
              <div role="group" aria-label="Shape" className="flex overflow-hidden rounded-md border border-sand-line">
                {SHAPE_MODES[shapeTool].map((m) => (
                  <button key={m} type="button" aria-pressed={snap.shapeModes[shapeTool] === m} onClick={() => store.setShapeMode(shapeTool, m)}
                    className="px-2 py-0.5 hover:bg-sand-deep aria-pressed:bg-harbour-50 aria-pressed:font-semibold aria-pressed:text-harbour-700">{MODE_LABEL[m]}</button>
                ))}
              </div>
            )}
            {shapeTool && snap.shapeModes[shapeTool] === 'brush' && (
              <label className="flex items-center gap-1">Brush <input type="range" min={0.005} max={0.2} step={0.005} value={snap.brushRadius} onChange={(e) => store.setBrushRadius(Number(e.target.value))} /> {(snap.brushRadius * 100).toFixed(1)} cm</label>
            )}
            {snap.tool === 'wall' && (
              <>
                <button type="button" className="btn-quiet px-2 py-0.5 text-xs" onClick={() => matteInput.current?.click()}>Trace a matte PNG…</button>
                <input ref={matteInput} type="file" accept="image/png" className="hidden" data-testid="matte-input" onChange={(e) => { const f = e.target.files?.[0]; if (f) void importMatte(f); e.target.value = ''; }} />
              </>
            )}
            {snap.tool === 'select' && <span className="text-ink-muted">Click to pick · drag to move · corners resize · knob rotates</span>}
            {snap.tool === 'tank' && <span className="text-ink-muted">Drag anywhere: the tank's top-right corner follows, to the millimetre (hold Shift for whole cells)</span>}
            {shapeTool && snap.shapeModes[shapeTool] === 'polygon' && <span className="text-ink-muted">Click points · click the first point or press Enter to close</span>}
            <label className="ml-auto flex items-center gap-1 text-ink-soft">Snap
              <select value={snap.snap} onChange={(e) => store.setSnap(e.target.value as SnapMode)} className="rounded border border-sand-line bg-white px-1 py-0.5">
                <option value="grid">to grid</option><option value="cells">to cells</option><option value="off">off</option>
              </select>
            </label>
            <button type="button" className="btn-quiet px-2 py-0.5 text-xs" onClick={() => viewRef.current?.fit()} title="Fit the tank in the view (F)">Fit</button>
          </div>

          <div className="relative min-h-0 flex-1">
            {/* Over the view, not above it: the bar appears after load and must not move the canvas under the pointer. */}
            {offer && (
              <div role="status" className="absolute inset-x-2 top-2 z-10 flex flex-wrap items-center gap-3 rounded-lg border border-harbour-100 bg-harbour-50/95 px-3.5 py-2 text-sm text-harbour-900 shadow-md" data-testid="draft-offer">
                <span className="flex-1">You have unsaved changes to this shot from {new Date(offer.savedAt).toLocaleString()}.</span>
                <button type="button" className="btn-primary px-3 py-1" onClick={() => { store.execute(replaceDocument(offer.scene, 'Restore unsaved changes')); setOffer(null); }}>Restore them</button>
                <button type="button" className="btn-quiet px-3 py-1" onClick={() => { dropDraft(localStorage, shotId); setOffer(null); }}>Discard</button>
              </div>
            )}
            <Viewport store={store} preview={preview} pictures={pictures} plate={plate} plateFirstFrame={plateStartFrame(boot.shot)} look={look} showPreview={showPreview} viewRef={viewRef} onCursor={onCursor} />
            <div className="pointer-events-none absolute right-2 bottom-2 rounded bg-ink/70 px-2 py-0.5 text-[0.7rem] text-sand tabular-nums">
              {cursor ? `x ${cursor[0].toFixed(3)} m · y ${cursor[1].toFixed(3)} m` : 'Wheel zooms · Space-drag pans'}
            </div>
          </div>

          <Ruler doc={snap.doc} frame={snap.frame} shot={boot.shot} computedTo={pv.computedTo} onFrame={(f) => store.setFrame(f)} />

          <div className="flex flex-wrap items-center gap-2 border-t border-sand-line bg-sand/40 px-3 py-2 text-[0.8rem]" data-testid="preview-bar">
            <span className="font-semibold text-ink">Live preview</span>
            <button type="button" className="btn-primary px-3 py-1" onClick={togglePreview}>{pv.playing ? 'Pause' : 'Play'}</button>
            <button type="button" className="btn-quiet px-3 py-1" onClick={restartPreview} title="Restart with the current scene (Shift+P)">Restart</button>
            <label className="flex items-center gap-1">Resolution
              <select value={pv.factor} onChange={(e) => preview.setFactor(Number(e.target.value))} className="rounded border border-sand-line bg-white px-1 py-0.5" data-testid="preview-resolution">
                {PREVIEW_FACTORS.map((f) => { const c = tankCells(previewScene(snap.doc, f).tank); return <option key={f} value={f}>{f === 1 ? 'bake' : `1/${f}`} · {c.nx}×{c.ny}</option>; })}
              </select>
            </label>
            <label className="flex items-center gap-1">Look
              <select aria-label="Preview look" value={look} onChange={(e) => setLook(e.target.value as RenderLook)} className="rounded border border-sand-line bg-white px-1 py-0.5">
                {RENDER_LOOKS.map((l) => <option key={l} value={l}>{LOOK_LABELS[l]}</option>)}
              </select>
            </label>
            <label className="flex items-center gap-1"><input type="checkbox" checked={showPreview} onChange={(e) => setShowPreview(e.target.checked)} /> Show</label>
            <span className="ml-auto text-ink-soft tabular-nums" data-testid="preview-stats" data-status={pv.status} data-computed={pv.computedTo ?? ''}>
              {pv.status === 'off' ? `Ready · ${previewCells.nx}×${previewCells.ny} cells` :
                pv.status === 'error' ? <span className="text-coral-700">{pv.message}</span> :
                `${pv.status} · ${pv.simFps.toFixed(1)} fps solved · ${pv.shownFps.toFixed(0)} fps shown · ${pv.particles.toLocaleString()} particles${pv.cells ? ` · ${pv.cells.nx}×${pv.cells.ny} cells` : ''}`}
            </span>
            {stale && <span className="w-full text-[0.75rem] text-coral-700">The scene changed since this preview started: Restart to see the changes.</span>}
          </div>
        </div>

        {/* Panels */}
        <aside className="flex min-h-0 w-80 shrink-0 flex-col border-l border-sand-line bg-paper" aria-label="Panels">
          <div role="tablist" className="flex border-b border-sand-line text-sm">
            {(['inspector', 'liquids', 'params'] as const).map((p) => (
              <button key={p} role="tab" type="button" aria-selected={panel === p} onClick={() => setPanel(p)}
                className="flex-1 px-3 py-2 font-medium text-ink-muted aria-selected:border-b-2 aria-selected:border-harbour-500 aria-selected:text-ink">
                {({ inspector: 'Inspector', liquids: 'Liquids', params: 'Parameters' } as const)[p]}
              </button>
            ))}
          </div>
          <div className="min-h-0 flex-1 overflow-y-auto">
            {panel === 'inspector' ? <Inspector store={store} snap={snap} shot={boot.shot} pictures={pictures} /> : panel === 'liquids' ? <LiquidsPanel store={store} snap={snap} /> : <ParamsPanel store={store} snap={snap} />}
          </div>
          <p className="border-t border-sand-line px-3 py-1.5 text-[0.7rem] text-ink-muted" role="status" aria-live="polite" data-testid="editor-status">{snap.status || 'Ready'}</p>
        </aside>
      </div>

      {help && <HelpOverlay onClose={() => setHelp(false)} />}
      {saving && (
        <SavePanel doc={snap.doc} shotId={shotId} studioSlug={boot.studio.slug} onClose={() => setSaving(false)}
          onSaved={(v) => { setSavedRevision(store.history.revision); setLastSaved({ id: v.id, number: v.number }); dropDraft(localStorage, shotId); }} />
      )}
    </div>
  );
}

