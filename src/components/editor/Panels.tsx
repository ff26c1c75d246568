// The editor's side panels: the Inspector (the selected item's numbers, a spout's aim and frames, a prop's keys and the
// timing helper) and the Parameters panel (tank, frame range, physics with units and explanations, physics presets).
// Both read the same document as the view and change it only through the store's commands.
import { useEffect, useRef, useState, useSyncExternalStore } from 'react';
import type { EditorStore, EditorSnapshot } from '~/lib/editor/store';
import { GROUP_LABEL, withCellSize, cellsNote, type AnyItem, type ItemRef } from '~/lib/editor/document';
import { setSection, replaceDocument } from '~/lib/editor/commands';
import { PARAMS, PHYSICS_PRESETS, applyPreset, readPath, sectionWith, type ParamSpec } from '~/lib/editor/params';
import { planDrop, surfaceHeightAt, impactFrameOf } from '~/lib/editor/timing';
import { DEFAULT_PROP_COLOUR, PROP_DENSITY_RANGE } from '~/lib/scene/schema';
import type { PictureShelf } from './picture-shelf';
import { shapeCentroid } from '~/lib/scene/shapes';
import type { ShapeDoc } from '~/lib/scene/schema';
import { jumpWarning } from '~/lib/editor/key-jump';
import { FIRST_FREE_DENSITY, densityHint, motionProblems, withDensity, withLaunch, withMotion, withRelease } from '~/lib/editor/motion';
import { NumberField, Section } from './fields';
import { frameWithTimecode, type SourceTimecodeShot } from '~/lib/timecode';

const r6 = (v: number) => Math.round(v * 1e6) / 1e6;

/** `shot` (cut in, rate, source timecode at the cut in) pairs frame numbers with their source timecode. */
export function Inspector({ store, snap, shot, pictures }: { store: EditorStore; snap: EditorSnapshot; shot?: SourceTimecodeShot; pictures?: PictureShelf }) {
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
  return <ItemInspector key={`${sel.ref.group}:${sel.ref.id}`} store={store} snap={snap} refItem={sel.ref} item={sel.item} shot={shot} pictures={pictures} />;
}

function ItemInspector({ store, snap, refItem, item, shot, pictures }: { store: EditorStore; snap: EditorSnapshot; refItem: ItemRef; item: AnyItem; shot?: SourceTimecodeShot; pictures?: PictureShelf }) {
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
            <NumberField label="Width" unit="m" value={s.width} min={1e-6} onCommit={(width) => setShape({ ...s, width })} compact />
            <NumberField label="Height" unit="m" value={s.height} min={1e-6} onCommit={(height) => setShape({ ...s, height })} compact />
          </>
        )}
        {s.type === 'circle' && (
          <>
            <NumberField label="Centre x" unit="m" value={s.x} onCommit={(x) => setShape({ ...s, x })} compact />
            <NumberField label="Centre y" unit="m" value={s.y} onCommit={(y) => setShape({ ...s, y })} compact />
            <NumberField label="Radius" unit="m" value={s.radius} min={1e-6} onCommit={(radius) => setShape({ ...s, radius })} compact />
          </>
        )}
        {s.type === 'polygon' && <p className="py-1 text-[0.8rem] text-ink-soft">{s.points.length} points. Drag the corners to resize, the knob above to rotate.</p>}
        {'velocity' in item && item.velocity && refItem.group === 'pours' && (
          <>
            <NumberField label="Start speed x" unit="m/s" value={item.velocity[0]} onCommit={(vx) => put({ ...item, velocity: [vx, item.velocity![1]] } as AnyItem)} compact />
            <NumberField label="Start speed y" unit="m/s" value={item.velocity[1]} onCommit={(vy) => put({ ...item, velocity: [item.velocity![0], vy] } as AnyItem)} compact />
          </>
        )}
        {'liquid' in item && (
          <div className="flex items-center justify-between gap-2 py-1">
            <label htmlFor="item-liquid" className="text-[0.8rem] font-medium">Liquid</label>
            <div className="flex items-center gap-1.5">
              <span aria-hidden="true" className="h-3 w-3 rounded-full border border-ink/20" style={{ background: snap.doc.liquids.find((l) => l.id === item.liquid)?.colour }} />
              <select id="item-liquid" value={item.liquid} onChange={(e) => put({ ...item, liquid: e.target.value } as AnyItem, `${item.id} uses ${snap.doc.liquids.find((l) => l.id === e.target.value)?.name ?? e.target.value}`)}
                className="w-40 rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]">
                {snap.doc.liquids.map((l) => <option key={l.id} value={l.id}>{l.name}</option>)}
              </select>
            </div>
          </div>
        )}
        {'liquid' in item && <p className="text-[0.7rem] text-ink-muted">Add or change liquids in the Liquids tab.</p>}
      </Section>
      {'startFrame' in item && <SpoutSection store={store} item={item} put={put} />}
      {'keys' in item && <PropLookSection item={item} put={put} pictures={pictures} />}
      {'keys' in item && <MotionSection doc={snap.doc} item={item} put={put} />}
      {'keys' in item && <PropSection store={store} snap={snap} item={item} put={put} shot={shot} />}
    </>
  );
}

function SpoutSection({ store, item, put }: { store: EditorStore; item: Extract<AnyItem, { startFrame: number }>; put: (n: AnyItem, l?: string) => void }) {
  const speed = Math.hypot(item.velocity[0], item.velocity[1]);
  const dir = (Math.atan2(item.velocity[1], item.velocity[0]) * 180) / Math.PI;
  const aim = (sp: number, deg: number) => put({ ...item, velocity: [r6(sp * Math.cos((deg * Math.PI) / 180)), r6(sp * Math.sin((deg * Math.PI) / 180))] }, `Aim ${item.id}`);
  const t = store.doc.timing;
  return (
    <Section title="Spout">
      <NumberField label="Speed" unit="m/s" value={r6(speed)} min={0} max={100} help="How fast liquid leaves the spout." onCommit={(v) => aim(v, dir)} />
      <NumberField label="Direction" unit="° from +x" value={r6(dir)} min={-360} max={360} help="0 points right, 90 up, −90 down. Or drag the round knob in the view." onCommit={(v) => aim(speed, v)} />
      <NumberField label="First frame" unit="frame" integer value={item.startFrame} min={t.startFrame} max={item.endFrame} onCommit={(v) => put({ ...item, startFrame: v })} />
      <NumberField label="Last frame" unit="frame" integer value={item.endFrame} min={item.startFrame} max={t.endFrame} onCommit={(v) => put({ ...item, endFrame: v })} />
    </Section>
  );
}

type PropItem = Extract<AnyItem, { keys: unknown }>;

/**
 * How the player, exports and share page draw the prop: in a fill colour, or as one of the studio's prop pictures
 * (a cut-out with alpha, fitted to the shape's bounds, drawn inside its outline). Choosing a picture needs no new bake.
 */
function PropLookSection({ item, put, pictures }: { item: PropItem; put: (n: AnyItem, l?: string) => void; pictures?: PictureShelf }) {
  const shelf = useSyncExternalStore(pictures?.subscribe ?? noSubscribe, pictures?.getSnapshot ?? noShelf, pictures?.getSnapshot ?? noShelf);
  const [wantsPicture, setWantsPicture] = useState(item.picture !== undefined);
  const fileInput = useRef<HTMLInputElement>(null);
  useEffect(() => {
    if (pictures && shelf.status === 'idle') void pictures.load();
  }, [pictures, shelf.status]);
  const colour = item.colour ?? DEFAULT_PROP_COLOUR;
  const usePicture = (id: number, name: string) => put({ ...item, picture: id } as AnyItem, `${item.id} drawn as ${name}`);
  const useColour = () => {
    setWantsPicture(false);
    if (item.picture !== undefined) {
      const { picture: _p, ...rest } = item;
      put(rest as AnyItem, `${item.id} drawn in its fill colour`);
    }
  };
  const chosen = shelf.pictures.find((p) => p.id === item.picture);
  const showPicture = wantsPicture || item.picture !== undefined;
  return (
    <Section title="Look">
      <fieldset className="flex flex-col gap-1 text-[0.8rem]" data-testid="prop-look">
        <legend className="sr-only">How the prop is drawn</legend>
        <label className="flex items-center gap-1.5">
          <input type="radio" name={`look-${item.id}`} checked={!showPicture} onChange={useColour} />
          <span className="font-medium">Fill colour</span>
          <input type="color" aria-label="Fill colour" value={colour.toLowerCase()} className="ml-auto h-6 w-10 rounded border border-sand-line"
            onChange={(e) => put({ ...item, colour: e.target.value.toUpperCase() } as AnyItem, `Colour of ${item.id}`)} />
        </label>
        <label className="flex items-center gap-1.5">
          <input type="radio" name={`look-${item.id}`} checked={showPicture} onChange={() => setWantsPicture(true)} disabled={!pictures} />
          <span className="font-medium">Picture</span>
          <span className="text-ink-muted">— a cut-out of the product, fitted to the shape</span>
        </label>
      </fieldset>
      {showPicture && pictures && (
        <div className="mt-1.5 flex flex-col gap-1.5">
          <div className="flex items-center justify-between gap-2">
            <label htmlFor="prop-picture" className="text-[0.8rem] font-medium">Picture</label>
            <select id="prop-picture" data-testid="prop-picture" value={item.picture ?? ''} className="w-40 rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]"
              onChange={(e) => {
                const p = shelf.pictures.find((x) => x.id === Number(e.target.value));
                if (p) usePicture(p.id, p.fileName);
              }}>
              <option value="" disabled>{shelf.status === 'loading' ? 'Loading…' : shelf.pictures.length ? 'Choose…' : 'None uploaded yet'}</option>
              {item.picture !== undefined && !chosen && shelf.status === 'ready' && <option value={item.picture}>Picture {item.picture} (not in this studio)</option>}
              {shelf.pictures.map((p) => <option key={p.id} value={p.id}>{p.fileName} · {p.width}×{p.height}</option>)}
            </select>
          </div>
          {chosen && <img src={chosen.url} alt={`Picture of ${item.id}`} className="mx-auto max-h-24 rounded border border-sand-line bg-[repeating-conic-gradient(#e8e2d6_0_25%,#fff_0_50%)] bg-[length:12px_12px] object-contain" />}
          <input ref={fileInput} type="file" accept="image/png,image/webp" className="sr-only" data-testid="prop-picture-file" aria-label="Upload a prop picture"
            onChange={async (e) => {
              const file = e.target.files?.[0];
              e.target.value = '';
              if (!file) return;
              const made = await pictures.upload(file);
              if (made) usePicture(made.id, made.fileName);
            }} />
          <button type="button" className="btn-quiet py-1 text-xs" disabled={!!shelf.upload} onClick={() => fileInput.current?.click()}>
            {shelf.upload ? (shelf.upload.fraction === null ? `Checking ${shelf.upload.name}…` : `Uploading ${shelf.upload.name} ${Math.round(shelf.upload.fraction * 100)}%`) : 'Upload a picture…'}
          </button>
          <p className="text-[0.7rem] leading-snug text-ink-muted">PNG or WebP with transparency, up to 2048 px a side and 8 MB. Its top edge sits along the top of the shape; the outline keeps the fill colour.</p>
          {shelf.message && <p role="alert" className="text-[0.75rem] text-coral-700">{shelf.message}</p>}
        </div>
      )}
    </Section>
  );
}
const noSubscribe = () => () => undefined;
const NO_SHELF = { pictures: [], status: 'ready', upload: null, message: null } as const;
const noShelf = () => NO_SHELF as unknown as ReturnType<PictureShelf['getSnapshot']>;

/** Keyed or free; a free prop's density, start speed and spin, or the frame its keys let it go. */
function MotionSection({ doc, item, put }: { doc: EditorSnapshot['doc']; item: PropItem; put: (n: AnyItem, l?: string) => void }) {
  const t = doc.timing;
  const problems = motionProblems(item, t);
  const v = item.velocity ?? [0, 0];
  const spin = item.spin ?? 0;
  const lastKey = item.keys[item.keys.length - 1]?.frame ?? t.startFrame;
  const firstRelease = Math.max(t.startFrame, Math.min(t.endFrame, Math.round(lastKey)));
  return (
    <Section title="Motion">
      <fieldset className="flex flex-col gap-1 text-[0.8rem]" data-testid="prop-motion">
        <legend className="sr-only">How the prop moves</legend>
        <label className="flex items-start gap-1.5">
          <input type="radio" name={`motion-${item.id}`} className="mt-0.5" checked={item.motion === 'keyed'} onChange={() => put(withMotion(item, 'keyed'), `${item.id} follows its keys`)} />
          <span><strong className="font-medium">Keyed</strong> <span className="text-ink-muted">— goes exactly where its keys put it; the liquid does not push it.</span></span>
        </label>
        <label className="flex items-start gap-1.5">
          <input type="radio" name={`motion-${item.id}`} className="mt-0.5" checked={item.motion === 'free'} onChange={() => put(withMotion(item, 'free'), `${item.id} moves freely`)} />
          <span><strong className="font-medium">Free</strong> <span className="text-ink-muted">— falls, floats or sinks, and is pushed by the liquid.</span></span>
        </label>
      </fieldset>
      {item.motion === 'free' && (
        <>
          <NumberField label="Density" unit="kg/m³" value={item.density ?? FIRST_FREE_DENSITY} min={PROP_DENSITY_RANGE.min} max={PROP_DENSITY_RANGE.max} testId="prop-density"
            help={densityHint(item.density)} onCommit={(d) => put(withDensity(item, d), `Density of ${item.id}`)} />
          <label className="mt-1 flex items-center gap-1.5 text-[0.8rem]">
            <input type="checkbox" data-testid="prop-has-release" checked={item.releaseFrame !== undefined}
              onChange={(e) => put(withRelease(item, e.target.checked ? firstRelease : null), e.target.checked ? `${item.id} keyed until ${firstRelease}` : `${item.id} free from the start`)} />
            Follow the keys until a release frame
          </label>
          {item.releaseFrame !== undefined ? (
            <NumberField label="Release frame" unit="frame" integer value={item.releaseFrame} min={t.startFrame} max={t.endFrame} testId="prop-release-frame"
              help="Keyed up to this frame, then free with the speed and spin its keys give it there (a hand throwing it)."
              onCommit={(f) => put(withRelease(item, f), `${item.id} released on ${f}`)} />
          ) : (
            <>
              <NumberField label="Start speed across" unit="m/s" value={v[0]} min={-100} max={100} testId="prop-vx" compact
                onCommit={(vx) => put(withLaunch(item, [vx, v[1]], spin), `Start speed of ${item.id}`)} />
              <NumberField label="Start speed up" unit="m/s" value={v[1]} min={-100} max={100} testId="prop-vy" compact
                onCommit={(vy) => put(withLaunch(item, [v[0], vy], spin), `Start speed of ${item.id}`)} />
              <NumberField label="Spin" unit="°/s" value={spin} min={-36000} max={36000} testId="prop-spin"
                help={`At frame ${t.startFrame}, from where it is drawn (or its first key). Positive spin turns it anticlockwise.`}
                onCommit={(s2) => put(withLaunch(item, v, s2), `Spin of ${item.id}`)} />
            </>
          )}
        </>
      )}
      {problems.length > 0 && (
        <ul role="alert" className="mt-1 list-disc pl-4 text-[0.75rem] text-coral-700">{problems.map((p) => <li key={p}>{p}</li>)}</ul>
      )}
    </Section>
  );
}

function PropSection({ store, snap, item, put, shot }: { store: EditorStore; snap: EditorSnapshot; item: Extract<AnyItem, { keys: unknown }>; put: (n: AnyItem, l?: string) => void; shot?: SourceTimecodeShot }) {
  const doc = snap.doc;
  const c = shapeCentroid(item.shape);
  const surfaceGuess = surfaceHeightAt(doc, c[0]);
  const [release, setRelease] = useState(item.keys[0]?.frame ?? doc.timing.startFrame);
  const [impact, setImpact] = useState(Math.min(doc.timing.endFrame, doc.timing.startFrame + Math.round(doc.timing.fps / 2)));
  const [surface, setSurface] = useState<number>(surfaceGuess ?? 0);
  const [mode, setMode] = useState<'keep-height' | 'from-rest'>('keep-height');
  const [message, setMessage] = useState<string | null>(null);
  const marked = impactFrameOf(item, surface, doc.timing.startFrame, doc.timing.endFrame);
  const keyAtFrame = () => {
    const f = snap.frame;
    const pose = { frame: f, dx: 0, dy: 0, angle: 0 };
    const prev = [...item.keys].reverse().find((k) => k.frame <= f) ?? item.keys[0];
    if (prev) Object.assign(pose, { dx: prev.dx, dy: prev.dy, angle: prev.angle });
    const keys = [...item.keys.filter((k) => k.frame !== f), pose].sort((a, b) => a.frame - b.frame);
    put({ ...item, keys }, `Key ${item.id} at ${f}`);
  };
  /** Keeps the new keys unless they make the prop jump more than its size in a frame and the artist says no. */
  const putKeys = (keys: typeof item.keys, label: string) => {
    const question = jumpWarning(item, { ...item, keys }, doc.timing.fps);
    if (question && !store.confirm(question)) return false;
    put({ ...item, keys }, label);
    return true;
  };
  const setKey = (i: number, patch: Partial<(typeof item.keys)[number]>) => {
    const keys = item.keys.map((k, j) => (j === i ? { ...k, ...patch } : k));
    if (keys.some((k, j) => j > 0 && !(k.frame > keys[j - 1].frame))) { setMessage('Keys must stay in frame order'); return; }
    setMessage(null);
    if (!putKeys(keys, `Edit key of ${item.id}`)) setKeysShown((n) => n + 1);
  };
  // bumped when a key edit is refused, so the table's inputs show the kept values again
  const [keysShown, setKeysShown] = useState(0);
  const keyInput = (k: (typeof item.keys)[number], i: number, field: 'dx' | 'dy' | 'angle', label: string) => (
    <input aria-label={`${label} at frame ${k.frame}`} defaultValue={field === 'angle' ? k[field] : +k[field].toFixed(4)} className="w-14 rounded border border-sand-line px-1 text-right"
      onFocus={() => store.setFrame(k.frame)}
      onKeyDown={(e) => { if (e.key === 'Enter') (e.target as HTMLInputElement).blur(); }}
      onBlur={(e) => { const v = Number(e.target.value); if (Number.isFinite(v) && v !== k[field]) setKey(i, { [field]: v }); }} />
  );
  const apply = () => {
    try {
      const r = planDrop(doc, item, { releaseFrame: release, impactFrame: impact, surfaceY: surface, mode });
      put({ ...item, keys: r.keys }, `Time ${item.id} to hit on ${impact}`);
      setMessage(mode === 'from-rest'
        ? `Released from rest ${r.dropHeight.toFixed(3)} m above the surface; hits at ${r.impactSpeed.toFixed(2)} m/s.`
        : `Release speed ${r.releaseSpeed.toFixed(2)} m/s ${r.releaseSpeed >= 0 ? 'down' : '(thrown up)'} over a ${r.dropHeight.toFixed(3)} m drop; hits at ${r.impactSpeed.toFixed(2)} m/s.`);
      store.setFrame(impact);
    } catch (e) {
      setMessage((e as Error).message);
    }
  };
  return (
    <>
      <Section title="Keys" aside={<button type="button" className="btn-quiet px-2 py-0.5 text-xs" onClick={keyAtFrame}>Key at frame {shot ? frameWithTimecode(shot, snap.frame) : snap.frame}</button>}>
        <div className="max-h-40 overflow-auto">
          <table className="w-full text-[0.75rem] tabular-nums">
            <thead className="text-ink-muted"><tr><th className="text-left font-medium">frame</th><th className="text-right font-medium">dx m</th><th className="text-right font-medium">dy m</th><th className="text-right font-medium">angle °</th><th /></tr></thead>
            <tbody>
              {item.keys.map((k, i) => (
                <tr key={`${k.frame}-${i}-${k.dx}-${k.dy}-${k.angle}-${keysShown}`} aria-selected={k.frame === snap.frame} className={k.frame === snap.frame ? 'bg-harbour-50' : ''} data-testid="key-row">
                  <td><button type="button" className="link text-[0.75rem]" title="Pick this key: go to its frame (a drag in the view then takes this key)" onClick={() => store.setFrame(k.frame)}>{k.frame}</button></td>
                  <td className="text-right">{keyInput(k, i, 'dx', 'Offset across')}</td>
                  <td className="text-right">{keyInput(k, i, 'dy', 'Offset up')}</td>
                  <td className="text-right">{keyInput(k, i, 'angle', 'Angle')}</td>
                  <td className="text-right">
                    {item.keys.length > 1 && <button type="button" aria-label={`Remove key at ${k.frame}`} className="px-1 text-coral-700" onClick={() => putKeys(item.keys.filter((_, j) => j !== i), `Remove key of ${item.id}`)}>×</button>}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="mt-1 text-[0.7rem] text-ink-muted">
          {item.motion === 'free' && item.releaseFrame === undefined
            ? 'A free prop starts where its first key puts it; after that the solver moves it.'
            : 'Pick a key by its frame, then drag its diamond in the view (the key nearest the current frame wins where diamonds overlap). Keys are linear in between and held outside.'}
        </p>
      </Section>
      {(item.motion === 'keyed' || item.releaseFrame !== undefined) && <Section title="Timing helper">
        <p className="mb-1 text-[0.7rem] leading-snug text-ink-muted">Pick the frame the prop must hit the liquid. Tidemark solves the drop h = v0·t + g·t²/2 (Newton, no drag) and keys every frame.</p>
        <NumberField label="Release frame" unit="frame" integer value={release} min={doc.timing.startFrame} max={doc.timing.endFrame} onCommit={setRelease} testId="timing-release" />
        <NumberField label="Impact frame" unit="frame" integer value={impact} min={doc.timing.startFrame} max={doc.timing.endFrame} onCommit={setImpact} testId="timing-impact" />
        <NumberField label="Surface height" unit="m" value={r6(surface)} min={0} max={doc.tank.height} help={surfaceGuess === null ? 'No pour under the prop: enter the height of the liquid.' : 'Top of the pour under the prop.'} onCommit={setSurface} />
        <fieldset className="mt-1 flex gap-3 text-[0.75rem]">
          <legend className="sr-only">Solve for</legend>
          <label className="flex items-center gap-1"><input type="radio" name="drop-mode" checked={mode === 'keep-height'} onChange={() => setMode('keep-height')} /> keep height, solve speed</label>
          <label className="flex items-center gap-1"><input type="radio" name="drop-mode" checked={mode === 'from-rest'} onChange={() => setMode('from-rest')} /> from rest, solve height</label>
        </fieldset>
        <button type="button" className="btn-primary mt-2 w-full py-1.5" onClick={apply}>Set keys to hit on frame {impact}</button>
        {message && <p className="mt-1.5 text-[0.75rem] text-ink-soft" role="status">{message}</p>}
        <p className="mt-1 text-[0.7rem] text-ink-muted">Reaches the surface on frame: <strong data-testid="prop-impact-frame">{marked ?? '—'}</strong></p>
      </Section>}
    </>
  );
}

export function ParamsPanel({ store, snap }: { store: EditorStore; snap: EditorSnapshot }) {
  const doc = snap.doc;
  const set = (path: string, value: unknown, label: string) => {
    const { section, value: v } = sectionWith(doc, path, value);
    store.execute(setSection(section, v as never, label));
  };
  // any cell size in the parameter's range; the tank keeps its size (the grid covers it, tankCells)
  const setCell = (cellSize: number) => {
    store.execute(setSection('tank', withCellSize(doc.tank, cellSize), `Cell size ${cellSize} m`));
  };
  const cellSpec = PARAMS.find((p) => p.path === 'tank.cellSize')!;
  const paramField = (p: ParamSpec) =>
    p.choices ? (
      <div key={p.path} className="py-1">
        <div className="flex items-center justify-between">
          <label htmlFor={`param-${p.path}`} className="text-[0.8rem] font-medium">{p.label}</label>
          <select id={`param-${p.path}`} value={readPath(doc, p.path) as number} onChange={(e) => set(p.path, Number(e.target.value), p.label)} className="rounded-md border border-sand-line bg-white px-2 py-1 text-[0.8rem]">
            {p.choices.map((c) => <option key={c} value={c}>{c}</option>)}
          </select>
        </div>
        <p className="mt-0.5 text-[0.7rem] leading-snug text-ink-muted">{p.help}</p>
      </div>
    ) : (
      <NumberField key={p.path} label={p.label} unit={p.unit} value={readPath(doc, p.path) as number} min={p.min} max={p.max} step={p.step} integer={p.integer} help={p.help}
        onCommit={(v) => set(p.path, v, p.label)} testId={`param-${p.path}`} />
    );
  const sides = doc.tank.sides;
  return (
    <>
      <Section title="Physics presets">
        <div className="grid grid-cols-3 gap-1.5">
          {PHYSICS_PRESETS.map((preset) => (
            <button key={preset.id} type="button" title={preset.blurb} className="btn-quiet px-2 py-1 text-xs" onClick={() => store.execute(replaceDocument(applyPreset(doc, preset), `Preset: ${preset.label}`))}>
              {preset.label}
            </button>
          ))}
        </div>
        <p className="mt-1 text-[0.7rem] text-ink-muted">Sets the physics below for that kind of splash; shapes stay as they are. Undo takes it back.</p>
      </Section>
      <Section title="Tank">
        <NumberField label="Width" unit="m" value={doc.tank.width} min={2 * doc.tank.cellSize} help={cellsNote(doc.tank.width, doc.tank.cellSize)} onCommit={(w) => set('tank.width', w, 'Tank width')} testId="tank-width" />
        <NumberField label="Height" unit="m" value={doc.tank.height} min={2 * doc.tank.cellSize} help={cellsNote(doc.tank.height, doc.tank.cellSize)} onCommit={(h) => set('tank.height', h, 'Tank height')} testId="tank-height" />
        <NumberField label="Cell size" unit="m" value={doc.tank.cellSize} min={cellSpec.min} max={Math.min(cellSpec.max, doc.tank.width / 2, doc.tank.height / 2)} help={cellSpec.help} onCommit={setCell} testId="param-tank.cellSize" />
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
              <option value="pcg-multigrid">Conjugate gradient (multigrid)</option>
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

