// The compare island: two baked versions of one shot drawn by the player's engine, locked to the same frame, either
// side by side or stacked with a wipe handle, and the table of what changed in their scenes.
import { useCallback, useEffect, useRef, useState } from 'react';
import { api, messageOf } from '../shared/api';
import { FormMessage } from '../shared/form';
import type { PlayerEngine } from '../player/engine';
import { openClip } from '../player/clipSource';
import { loadPropImages } from '~/lib/render/prop-pictures';
import { openPlate, type PlateFrameSource } from '~/lib/plate';
import { rateInfo } from '~/lib/timecode';
import ChangeTable from './ChangeTable';
import { STATE_TONE, STATE_WORDS, type CompareAnswer } from './types';
import { versionLabel } from '~/lib/vocab';

interface Props {
  studioId: number;
  studioSlug: string;
  compare: CompareAnswer;
  /** The shot's frame rate id (for the plate's video timing). */
  frameRate: string;
}

type Mode = 'wipe' | 'side';

/** A version's review state in words; one sent back and superseded since says both. */
const stateWord = (v: { reviewState: string; sentBack?: boolean }) =>
  v.reviewState === 'superseded' && v.sentBack ? 'Sent back, then replaced' : (STATE_WORDS[v.reviewState] ?? v.reviewState);

export default function CompareScreen({ studioId, studioSlug, compare, frameRate }: Props) {
  const { a, b, shot } = compare;
  const bothBaked = a.bakeState === 'baked' && b.bakeState === 'baked';
  const [mode, setMode] = useState<Mode>('wipe');
  const [wipe, setWipe] = useState(0.5);
  const [range, setRange] = useState<{ start: number; end: number } | null>(null);
  const [frame, setFrame] = useState<number | null>(null);
  const [playing, setPlaying] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const hostA = useRef<HTMLDivElement>(null);
  const hostB = useRef<HTMLDivElement>(null);
  const engines = useRef<[PlayerEngine, PlayerEngine] | null>(null);

  let fps = 24;
  try {
    fps = rateInfo(frameRate).fps;
  } catch {
    /* unknown id: plates of stills don't need it */
  }

  // Open both clips (and the plate under each) once; both engines then follow one frame.
  useEffect(() => {
    if (!bothBaked) return;
    let cancelled = false;
    const made: PlayerEngine[] = [];
    (async () => {
      const plateFor = async (assetId: number | null): Promise<PlateFrameSource | null> => {
        if (!assetId) return null;
        try {
          const view = await api<{ url: string; asset: { contentType: string } }>(`/api/studios/${studioId}/plates/${assetId}`);
          return await openPlate({ url: view.url, contentType: view.asset.contentType, shot, fps });
        } catch {
          return null; // a plate that cannot be shown: the splashes are still compared on their own
        }
      };
      const [clipA, clipB, plateA, plateB] = await Promise.all([
        openClip(a.id, null),
        openClip(b.id, null),
        plateFor(a.plateAssetId ?? shot.plateAssetId),
        plateFor(b.plateAssetId ?? shot.plateAssetId),
      ]);
      // Each side's props in the pictures its own scene names (a prop that cannot load one keeps its fill colour).
      const [picturesA, picturesB] = await Promise.all([
        loadPropImages(clipA.source.look, clipA.info.propPictures),
        loadPropImages(clipB.source.look, clipB.info.propPictures),
      ]);
      if (cancelled) return;
      // pixi.js touches `navigator` when loaded, so the engine is loaded in the browser only (this island is also
      // rendered on the server).
      const { PlayerEngine } = await import('../player/engine');
      if (cancelled) return;
      const mk = (host: HTMLDivElement, frames: typeof clipA.source, plate: PlateFrameSource | null, pictures: typeof picturesA) =>
        PlayerEngine.create({ host, frames, plate, metresPerPixel: plate ? shot.metresPerPixel : null, look: 'surface', lookOptions: { propImages: pictures.images } });
      const ea = await mk(hostA.current!, clipA.source, plateA, picturesA);
      made.push(ea);
      const eb = await mk(hostB.current!, clipB.source, plateB, picturesB);
      made.push(eb);
      if (cancelled) return;
      engines.current = [ea, eb];
      // The frames both clips hold; outside them one side would have nothing to show.
      const start = Math.max(clipA.source.startFrame, clipB.source.startFrame);
      const end = Math.min(clipA.source.endFrame, clipB.source.endFrame);
      const wanted = Number(new URLSearchParams(window.location.search).get('frame'));
      const first = Number.isInteger(wanted) && wanted >= start && wanted <= end ? wanted : start;
      setRange({ start, end: Math.max(start, end) });
      await Promise.all([ea.show(first), eb.show(first)]);
      if (!cancelled) setFrame(first);
    })().catch((err) => !cancelled && setError(messageOf(err)));
    return () => {
      cancelled = true;
      engines.current = null;
      for (const e of made) e.destroy();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [a.id, b.id, bothBaked]);

  const goTo = useCallback(
    (f: number) => {
      if (!range) return;
      const target = Math.max(range.start, Math.min(range.end, Math.round(f)));
      setFrame(target);
      const pair = engines.current;
      if (pair) void Promise.all(pair.map((e) => e.show(target))).catch((err) => setError(messageOf(err)));
    },
    [range],
  );

  // Playback: both sides step together at the shot's rate, looping over the frames both hold.
  useEffect(() => {
    if (!playing || !range) return;
    const timer = window.setInterval(() => {
      setFrame((f) => {
        const next = f === null || f >= range.end ? range.start : f + 1;
        const pair = engines.current;
        if (pair) void Promise.all(pair.map((e) => e.show(next))).catch((err) => setError(messageOf(err)));
        return next;
      });
    }, 1000 / fps);
    return () => window.clearInterval(timer);
  }, [playing, range, fps]);

  // Both engines watch their own host size; switching layout changes it.
  useEffect(() => {
    engines.current?.forEach((e) => e.resize());
  }, [mode]);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement | null;
      if (t && ['INPUT', 'TEXTAREA', 'SELECT'].includes(t.tagName) && (t as HTMLInputElement).type !== 'range') return;
      if (frame === null) return;
      // the focused button's own click, except the layout's radios: after picking "Side by side" Space still plays
      if (e.key === ' ' && t?.tagName === 'BUTTON' && t.getAttribute('role') !== 'radio') return;
      if (e.key === ' ') setPlaying((p) => !p);
      else if (e.key === 'ArrowRight') {
        setPlaying(false);
        goTo(frame + (e.shiftKey ? 10 : 1));
      } else if (e.key === 'ArrowLeft') {
        setPlaying(false);
        goTo(frame - (e.shiftKey ? 10 : 1));
      } else return;
      e.preventDefault();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [frame, goTo]);

  const pick = (side: 'a' | 'b', id: number) => {
    const q = new URLSearchParams(window.location.search);
    q.set(side, String(id));
    window.location.assign(`/studios/${studioSlug}/compare?${q.toString()}`);
  };
  const picker = (side: 'a' | 'b', v: typeof a) => (
    <select
      className="field-input w-auto py-1 text-sm"
      value={v.id}
      aria-label={side === 'a' ? 'First version' : 'Second version'}
      onChange={(e) => pick(side, Number(e.target.value))}
      data-testid={`compare-pick-${side}`}
    >
      {compare.versions.map((o) => (
        <option key={o.id} value={o.id} disabled={o.id === (side === 'a' ? b.id : a.id)}>
          {versionLabel(o.number)} · {stateWord(o)}
          {o.bakeState !== 'baked' ? ' · not baked' : ''}
        </option>
      ))}
    </select>
  );
  const label = (v: typeof a) => (
    <span className="flex items-center gap-2">
      <a className="font-semibold hover:underline" href={`/studios/${studioSlug}/versions/${v.id}${frame !== null ? `?frame=${frame}` : ''}`}>
        {versionLabel(v.number)}
      </a>
      <span className={`rounded-full px-2 py-0.5 text-xs font-medium ${STATE_TONE[v.reviewState] ?? ''}`}>{stateWord(compare.versions.find((o) => o.id === v.id) ?? v)}</span>
    </span>
  );
  const aspect = `${shot.plateWidth} / ${shot.plateHeight}`;

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div className="flex flex-wrap items-center gap-3 text-sm">
          {picker('a', a)} {label(a)} <span className="text-ink-muted">against</span> {picker('b', b)} {label(b)}
        </div>
        <div role="radiogroup" aria-label="Layout" className="flex gap-1 rounded-lg border border-sand-line bg-paper p-1">
          {(['wipe', 'side'] as const).map((m) => (
            <button
              key={m}
              type="button"
              role="radio"
              aria-checked={mode === m}
              className={`rounded-md px-3 py-1 text-sm ${mode === m ? 'bg-harbour-500 text-white' : 'text-ink-soft hover:bg-sand-deep'}`}
              onClick={() => setMode(m)}
              data-testid={`compare-mode-${m}`}
            >
              {m === 'wipe' ? 'Wipe' : 'Side by side'}
            </button>
          ))}
        </div>
      </div>

      {error && <FormMessage>{error}</FormMessage>}
      <p className="text-xs text-ink-muted">Space plays and pauses both sides together; ← and → step a frame (Shift: ten).</p>
      {!bothBaked ? (
        <FormMessage tone="info">Both versions need a bake before their frames can be compared. The scene changes are listed below.</FormMessage>
      ) : (
        <section className="card overflow-hidden p-3" data-testid="compare-view" data-mode={mode}>
          <div className={mode === 'side' ? 'grid gap-3 sm:grid-cols-2' : 'relative'}>
            <div className="relative w-full overflow-hidden rounded-lg bg-ink" style={{ aspectRatio: aspect }}>
              <div ref={hostA} className="absolute inset-0" data-testid="compare-a" />
              {mode === 'side' && <Tag text={versionLabel(a.number)} />}
            </div>
            <div
              className={mode === 'side' ? 'relative w-full overflow-hidden rounded-lg bg-ink' : 'absolute inset-0 overflow-hidden rounded-lg'}
              style={mode === 'side' ? { aspectRatio: aspect } : { clipPath: `inset(0 0 0 ${wipe * 100}%)` }}
            >
              <div ref={hostB} className="absolute inset-0" data-testid="compare-b" />
              {mode === 'side' && <Tag text={versionLabel(b.number)} />}
            </div>
            {mode === 'wipe' && (
              <>
                <div className="pointer-events-none absolute inset-y-0 w-0.5 bg-white/90" style={{ left: `${wipe * 100}%` }} aria-hidden="true" />
                <Tag text={versionLabel(a.number)} />
                <Tag text={versionLabel(b.number)} right />
              </>
            )}
          </div>
          {mode === 'wipe' && (
            <label className="mt-3 flex items-center gap-3 text-sm">
              <span className="shrink-0 text-ink-soft">Wipe</span>
              <input type="range" min={0} max={1} step={0.005} value={wipe} onChange={(e) => setWipe(Number(e.target.value))} className="w-full" data-testid="compare-wipe" />
            </label>
          )}
          <label className="mt-3 flex items-center gap-3 text-sm">
            <button type="button" className="btn-quiet shrink-0" disabled={!range} onClick={() => setPlaying((p) => !p)} aria-pressed={playing} data-testid="compare-play" title="Space">
              {playing ? 'Pause' : 'Play'}
            </button>
            <span className="shrink-0 text-ink-soft">Frame</span>
            <input
              type="range"
              min={range?.start ?? 0}
              max={range?.end ?? 0}
              step={1}
              value={frame ?? range?.start ?? 0}
              disabled={!range}
              onChange={(e) => {
                setPlaying(false);
                goTo(Number(e.target.value));
              }}
              className="w-full"
              data-testid="compare-frame"
            />
            <span className="w-14 shrink-0 text-right font-mono tabular-nums" data-testid="compare-frame-number">
              {frame ?? '…'}
            </span>
          </label>
        </section>
      )}

      <ChangeTable changes={compare.changes} counts={compare.counts} older={a.number} newer={b.number} />
    </div>
  );
}

function Tag({ text, right = false }: { text: string; right?: boolean }) {
  return <span className={`pointer-events-none absolute top-2 rounded bg-ink/70 px-2 py-0.5 text-xs font-medium text-white ${right ? 'right-2' : 'left-2'}`}>{text}</span>;
}
