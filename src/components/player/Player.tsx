// The player island's body: a baked version over its plate, scrubbed on a ruler in shot frames and SMPTE timecode,
// stepped with ←/→, played at the shot's fps with loop and in/out range, in the liquid look (each liquid in its
// colour, walls and props drawn) or the particle-speed look, with the bake statistics beside it.
import { useCallback, useEffect, useRef, useState } from 'react';
import { frameWithTimecode, rateInfo, rateText, sourceTimecodeLabel } from '~/lib/timecode';
import { openPlate, type PlateFrameSource } from '~/lib/plate';
import { LOOK_DESCRIPTIONS, LOOK_LABELS, RENDER_LOOKS, SPEED_RAMP, type LookOptions, type RenderLook } from '~/lib/render/looks';
import { api, messageOf } from '../shared/api';
import { FormMessage } from '../shared/form';
import type { PlayerEngine } from './engine';
import { Playback } from './playback';
import { openClip, loadStats } from './clipSource';
import { loadPropImages } from '~/lib/render/prop-pictures';
import Timeline from './Timeline';
import StatsCharts from './StatsCharts';
import type { BakeStats, ClipInfo, PlateInfo, ShotInfo, VersionInfo } from './types';
import { playRanges } from './playRange';

interface Props {
  studioId: number;
  version: VersionInfo;
  shot: ShotInfo;
  plate: PlateInfo | null;
  /** Presigned clip URLs made with the page (null: the player asks the API). */
  clip: ClipInfo | null;
  /** Told the frame whenever it changes (the review panel pins new notes to it). */
  onFrame?: (frame: number) => void;
  /** A request to show a frame (a note clicked, or ?frame= in the address); applied once the clip is open. */
  seekTo?: { frame: number } | null;
}

type Status = { kind: 'loading' } | { kind: 'ready' } | { kind: 'error'; message: string };

/** Frames per second of a shot's rate id, or of the clip when the id is unknown. */
function fpsOf(rate: string, fallback: number): number {
  try {
    return rateInfo(rate).fps;
  } catch {
    return fallback;
  }
}

/** Rest density (particles per m²) and top of the speed ramp (m/s) from the bake statistics. */
function lookOptionsFrom(stats: BakeStats | null): LookOptions {
  if (!stats) return {};
  const measured = stats.frames.find((f) => typeof f.liquidArea === 'number' && Number.isFinite(f.liquidArea) && f.liquidArea > 0 && f.count > 0);
  const speeds = stats.frames.map((f) => f.maxSpeed).filter((v) => Number.isFinite(v) && v > 0);
  return {
    restDensity: measured ? measured.count / (measured.liquidArea as number) : undefined,
    speedScale: speeds.length ? Math.max(...speeds) : undefined,
  };
}

export default function Player({ studioId, version, shot, plate, clip, onFrame, seekTo }: Props) {
  const host = useRef<HTMLDivElement>(null);
  const engineRef = useRef<PlayerEngine | null>(null);
  const playbackRef = useRef<Playback | null>(null);
  const [status, setStatus] = useState<Status>({ kind: 'loading' });
  const [range, setRange] = useState({ start: version.startFrame, end: version.endFrame });
  const [frame, setFrame] = useState(version.startFrame);
  const [drawnFrame, setDrawnFrame] = useState<number | null>(null);
  const [playing, setPlaying] = useState(false);
  const [loop, setLoop] = useState(true);
  const [inOut, setInOut] = useState<{ inFrame: number; outFrame: number } | null>(null);
  const [look, setLook] = useState<RenderLook>('surface');
  const [stats, setStats] = useState<BakeStats | null>(null);
  // No statistics URL: none stored with the bake, or withheld (clients see no solver statistics): no card at all.
  const [statsOffered, setStatsOffered] = useState(true);
  const [plateNote, setPlateNote] = useState<string | null>(null);
  const [firstFrameMs, setFirstFrameMs] = useState<number | null>(null);
  const [rateNote, setRateNote] = useState<string | null>(null);
  const [speedScale, setSpeedScale] = useState<number | null>(null);
  const [hasWalls, setHasWalls] = useState(false);
  const [wallsHidden, setWallsHidden] = useState(false);

  const fps = fpsOf(shot.frameRate, 24);
  // The timeline spans the cut range with its handles; in/out default to the baked part of it (playRange.ts).
  const ranges = playRanges(shot, range);
  const inFrame = inOut?.inFrame ?? ranges.play.start;
  const outFrame = inOut?.outFrame ?? ranges.play.end;
  const state = useRef({ frame, inFrame, outFrame, loop, fps, range });
  state.current = { frame, inFrame, outFrame, loop, fps, range };

  // Open the clip, the plate and the stats together; show the first frame as soon as the clip and plate are in.
  useEffect(() => {
    let cancelled = false;
    const t0 = performance.now();
    // pixi.js touches browser globals when imported: load it in the browser only (this island also renders on the
    // server), in parallel with the clip and the plate.
    const engineModule = import('./engine');
    (async () => {
      const platePromise: Promise<PlateFrameSource | null> = plate
        ? (async () => {
            const url = plate.url ?? (await api<{ url: string }>(`/api/studios/${studioId}/plates/${plate.assetId}`)).url;
            return openPlate({ url, contentType: plate.contentType, shot, fps });
          })().catch((err) => {
            setPlateNote(`The plate could not be shown (${messageOf(err)}); the splash is drawn on its own.`);
            return null;
          })
        : Promise.resolve(null);
      const [opened, plateOpened] = await Promise.all([openClip(version.id, clip), platePromise]);
      if (!opened.info.statsUrl) setStatsOffered(false);
      const statsPromise = loadStats<BakeStats>(opened.info.statsUrl);
      // The props' pictures (a few small images) are part of the look: the first frame waits for them.
      const [bakeStats, pictures] = await Promise.all([
        Promise.race([
          statsPromise,
          new Promise<null>((r) => setTimeout(() => r(null), 400)), // never hold the first frame for long
        ]),
        loadPropImages(opened.source.look, opened.info.propPictures),
      ]);
      if (cancelled) return plateOpened?.destroy();
      if (pictures.failed.length) setPlateNote(`The picture of ${pictures.failed.join(', ')} could not be loaded; drawn in its fill colour.`);
      const propImages = pictures.images;
      const options: LookOptions = { ...lookOptionsFrom(bakeStats), propImages };
      const { PlayerEngine } = await engineModule;
      const engine = await PlayerEngine.create({
        host: host.current!,
        frames: opened.source,
        plate: plateOpened,
        metresPerPixel: plateOpened ? shot.metresPerPixel : null,
        look,
        lookOptions: options,
      });
      if (cancelled) return engine.destroy();
      engineRef.current = engine;
      setHasWalls(engine.drawsWalls);
      playbackRef.current = new Playback(
        engine,
        (f) => {
          setFrame(f);
          setDrawnFrame(f);
        },
        () => setPlaying(false),
      );
      setRange({ start: opened.source.startFrame, end: opened.source.endFrame });
      setSpeedScale(options.speedScale ?? null);
      const first = playRanges(shot, { start: opened.source.startFrame, end: opened.source.endFrame }).play.start;
      await engine.show(first);
      if (cancelled) return;
      setFrame(first);
      setDrawnFrame(first);
      setFirstFrameMs(Math.round(performance.now() - t0));
      setStatus({ kind: 'ready' });
      if (bakeStats) setStats(bakeStats);
      else
        void statsPromise.then((s) => {
          if (cancelled || !s) return;
          setStats(s);
          const late = lookOptionsFrom(s);
          setSpeedScale(late.speedScale ?? null);
          engine.setLook(engine.look, { ...late, propImages });
        });
    })().catch((err) => {
      if (!cancelled) setStatus({ kind: 'error', message: messageOf(err) });
    });
    return () => {
      cancelled = true;
      playbackRef.current?.stop(false);
      engineRef.current?.destroy();
      engineRef.current = null;
    };
    // Opened once per version; the look and frame change through the engine.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [version.id]);

  const goTo = useCallback((target: number) => {
    const s = state.current;
    const f = Math.max(s.range.start, Math.min(s.range.end, Math.round(target)));
    playbackRef.current?.stop();
    setFrame(f);
    const engine = engineRef.current;
    if (!engine) return;
    void engine
      .show(f)
      .then(() => {
        if (engine.currentFrame === f) setDrawnFrame(f);
      })
      .catch((err) => setStatus({ kind: 'error', message: messageOf(err) }));
  }, []);

  const step = useCallback((by: number) => goTo(state.current.frame + by), [goTo]);

  useEffect(() => onFrame?.(frame), [frame, onFrame]);
  const ready = status.kind === 'ready';
  useEffect(() => {
    if (seekTo && ready) goTo(seekTo.frame);
  }, [seekTo, ready, goTo]);

  const togglePlay = useCallback(() => {
    const pb = playbackRef.current;
    if (!pb) return;
    if (pb.playing) {
      pb.stop();
      setRateNote(null);
      return;
    }
    const s = state.current;
    const t0 = performance.now();
    pb.start(s.frame, s.fps, { inFrame: s.inFrame, outFrame: s.outFrame, loop: s.loop });
    setPlaying(true);
    // Report the rate actually held once a second of playback has passed.
    const report = () => {
      if (!pb.playing) return;
      const secs = (performance.now() - t0) / 1000;
      if (secs >= 1) setRateNote(`${(pb.drawn / secs).toFixed(1)} fps drawn · ${pb.skipped} skipped`);
      setTimeout(report, 1000);
    };
    setTimeout(report, 1000);
  }, []);

  const setIn = useCallback(() => {
    const s = state.current;
    setInOut({ inFrame: s.frame, outFrame: Math.max(s.frame, s.outFrame) });
  }, []);
  const setOut = useCallback(() => {
    const s = state.current;
    setInOut({ inFrame: Math.min(s.frame, s.inFrame), outFrame: s.frame });
  }, []);
  const clearInOut = useCallback(() => setInOut(null), []);

  // Keys: ←/→ one frame (Shift: ten), Space play/pause, Home/End to in/out, I/O set in/out, X clear. Loop stays on its
  // button: J/K/L are shuttle keys in editors' habits (common practice, no source), so L must not toggle a loop.
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.defaultPrevented || e.altKey || e.ctrlKey || e.metaKey) return;
      const t = e.target as HTMLElement | null;
      if (t && (t.isContentEditable || ['INPUT', 'TEXTAREA', 'SELECT'].includes(t.tagName))) return;
      if (e.key === ' ' && t?.tagName === 'BUTTON') return; // the focused button's own action
      if (!engineRef.current) return;
      const s = state.current;
      switch (e.key) {
        case 'ArrowLeft':
          step(e.shiftKey ? -10 : -1);
          break;
        case 'ArrowRight':
          step(e.shiftKey ? 10 : 1);
          break;
        case ' ':
          togglePlay();
          break;
        case 'Home':
          goTo(s.inFrame);
          break;
        case 'End':
          goTo(s.outFrame);
          break;
        case 'i':
        case 'I':
          setIn();
          break;
        case 'o':
        case 'O':
          setOut();
          break;
        case 'x':
        case 'X':
          clearInOut();
          break;
        default:
          return;
      }
      e.preventDefault();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [step, togglePlay, goTo, setIn, setOut, clearInOut]);

  // A new loop or range applies to the running playback.
  useEffect(() => {
    const pb = playbackRef.current;
    if (pb?.playing) pb.start(state.current.frame, fps, { inFrame, outFrame, loop });
  }, [inFrame, outFrame, loop, fps]);

  const chooseLook = (l: RenderLook) => {
    setLook(l);
    engineRef.current?.setLook(l);
  };

  const total = range.end - range.start + 1;
  const tc = sourceTimecodeLabel(shot, frame, '—');

  return (
    <div className={`grid gap-5 ${statsOffered ? 'lg:grid-cols-[minmax(0,1fr)_18rem]' : ''}`}>
      <section aria-label="Player" className="card overflow-hidden" data-testid="player" data-status={status.kind} data-drawn-frame={drawnFrame ?? ''}>
        <div className="relative aspect-video w-full bg-[#0b1418]">
          <div ref={host} className="absolute inset-0" data-testid="player-view" />
          {status.kind === 'loading' && <p className="absolute inset-0 grid place-items-center text-sm text-sand/80">Opening the bake…</p>}
          {status.kind === 'error' && (
            <div className="absolute inset-x-6 top-6">
              <FormMessage>{`The player could not open this bake: ${status.message}`}</FormMessage>
            </div>
          )}
        </div>

        <div className="space-y-3 p-4">
          <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
            <div className="flex items-baseline gap-3" aria-live="off">
              <span className="text-2xl font-semibold tabular-nums" data-testid="frame-readout" aria-label="Frame">
                {frame}
              </span>
              <span className="font-mono text-sm text-ink-soft tabular-nums" data-testid="timecode-readout" aria-label="Timecode">
                {tc}
              </span>
              <span className="text-xs text-ink-muted tabular-nums">
                {frame - range.start + 1} / {total}
              </span>
            </div>
            {hasWalls && (
              <button
                type="button"
                className="btn-quiet ml-auto px-3 py-1.5"
                aria-pressed={!wallsHidden}
                title="Hide the walls when the plate already shows them"
                onClick={() => {
                  setWallsHidden((h) => !h);
                  engineRef.current?.setWallsHidden(!wallsHidden);
                }}
              >
                Walls {wallsHidden ? 'hidden' : 'shown'}
              </button>
            )}
            <div className={`${hasWalls ? '' : 'ml-auto '}flex items-center gap-1`} role="group" aria-label="Render look">
              {RENDER_LOOKS.map((l) => (
                <button
                  key={l}
                  type="button"
                  aria-pressed={look === l}
                  className="rounded-md px-2.5 py-1 text-sm font-medium text-ink-soft hover:bg-sand-deep aria-pressed:bg-harbour-50 aria-pressed:text-harbour-700"
                  onClick={() => chooseLook(l)}
                  title={LOOK_DESCRIPTIONS[l]}
                >
                  {LOOK_LABELS[l]}
                </button>
              ))}
            </div>
          </div>

          <Timeline
            start={ranges.timeline.start}
            end={ranges.timeline.end}
            bakedStart={range.start}
            bakedEnd={range.end}
            frame={frame}
            inFrame={inFrame}
            outFrame={outFrame}
            shotFirst={shot.firstFrame}
            shotLast={shot.lastFrame}
            tcShot={shot}
            onScrub={goTo}
          />

          <div className="flex flex-wrap items-center gap-2" role="toolbar" aria-label="Transport">
            <IconButton label="Go to in point (Home)" onClick={() => goTo(inFrame)} disabled={status.kind !== 'ready'}>
              <path d="M4 3v10M13 3 6 8l7 5z" />
            </IconButton>
            <IconButton label="Previous frame (←)" onClick={() => step(-1)} disabled={status.kind !== 'ready'}>
              <path d="M11 3 5 8l6 5z" />
            </IconButton>
            <button type="button" className="btn-primary min-w-24" onClick={togglePlay} disabled={status.kind !== 'ready'} aria-keyshortcuts="Space">
              {playing ? 'Pause' : 'Play'}
            </button>
            <IconButton label="Next frame (→)" onClick={() => step(1)} disabled={status.kind !== 'ready'}>
              <path d="m5 3 6 5-6 5z" />
            </IconButton>
            <IconButton label="Go to out point (End)" onClick={() => goTo(outFrame)} disabled={status.kind !== 'ready'}>
              <path d="M12 3v10M3 3l7 5-7 5z" />
            </IconButton>
            <span className="mx-1 h-6 w-px bg-sand-line" aria-hidden="true" />
            <button type="button" className="btn-quiet px-3 py-1.5" aria-pressed={loop} onClick={() => setLoop((v) => !v)} aria-keyshortcuts="L">
              Loop {loop ? 'on' : 'off'}
            </button>
            <button type="button" className="btn-quiet px-3 py-1.5" onClick={setIn} aria-keyshortcuts="I">
              Set in
            </button>
            <button type="button" className="btn-quiet px-3 py-1.5" onClick={setOut} aria-keyshortcuts="O">
              Set out
            </button>
            {inOut && (
              <button type="button" className="btn-quiet px-3 py-1.5" onClick={clearInOut} aria-keyshortcuts="X">
                Clear range
              </button>
            )}
            <span className="ml-auto text-xs text-ink-muted tabular-nums" data-testid="range-readout">
              In {frameWithTimecode(shot, inFrame)} · Out {frameWithTimecode(shot, outFrame)} · {rateText(shot.frameRate)}
            </span>
          </div>

          <div className="flex flex-wrap items-center justify-between gap-2 text-xs text-ink-muted">
            <span className="flex flex-wrap items-center gap-2" data-testid="look-description">
              <span>{LOOK_DESCRIPTIONS[look]}</span>
              {look === 'speed' && <SpeedLegend scale={speedScale} />}
            </span>
            <span data-testid="player-timing">
              {rateNote ?? (firstFrameMs !== null ? `First frame in ${firstFrameMs} ms` : '')}
            </span>
          </div>
          <p className="text-xs text-ink-muted">
            Keys: ←/→ one frame (Shift: ten) · Space play/pause · I/O set in/out · X clear range · Home/End in/out
          </p>
          {plateNote && <FormMessage tone="info">{plateNote}</FormMessage>}
        </div>
      </section>

      {statsOffered && <aside>{stats ? <StatsCharts stats={stats} frame={frame} onSeek={goTo} /> : <StatsPlaceholder ready={status.kind === 'ready'} />}</aside>}
    </div>
  );
}

function IconButton({ label, onClick, disabled, children }: { label: string; onClick: () => void; disabled?: boolean; children: React.ReactNode }) {
  return (
    <button type="button" className="btn-quiet size-9 px-0" aria-label={label} title={label} onClick={onClick} disabled={disabled}>
      <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" fill="currentColor" stroke="currentColor" strokeWidth="1.2" strokeLinejoin="round">
        {children}
      </svg>
    </button>
  );
}

function SpeedLegend({ scale }: { scale: number | null }) {
  const gradient = `linear-gradient(to right, ${SPEED_RAMP.map(([p, r, g, b]) => `rgb(${r} ${g} ${b}) ${p * 100}%`).join(', ')})`;
  return (
    <span className="flex items-center gap-2">
      <span>0</span>
      <span className="h-2 w-28 rounded-full" style={{ background: gradient }} aria-hidden="true" />
      <span>{scale ? `${scale.toFixed(1)} m/s` : 'fastest'}</span>
    </span>
  );
}

function StatsPlaceholder({ ready }: { ready: boolean }) {
  return (
    <section className="card p-4 text-sm text-ink-muted">
      <h2 className="text-sm font-semibold text-ink">Bake statistics</h2>
      <p className="mt-2">{ready ? 'This bake has no statistics stored with it.' : 'Loading…'}</p>
    </section>
  );
}
