// The public share page's island: plays what the link shows (the version's splash over its plate on a canvas, or the
// stored MP4/GIF) and takes the viewer's named comment at the current frame, filed as a client note.
import type { PropPictureRef } from '~/lib/render/prop-pictures';
import { useEffect, useRef, useState } from 'react';
import { frameWithTimecode, rateInfo, sourceTimecodeLabel, type SourceTimecodeShot } from '~/lib/timecode';
import { LOOK_LABELS, RENDER_LOOKS, type RenderLook } from '~/lib/render/looks';
import type { FrameRenderer } from '~/lib/export/frames';

interface Props {
  token: string;
  frameRate: string;
  /** The shot's cut-in frame and its source timecode: frames are shown with the plate's own timecode. */
  cutIn: number;
  sourceTimecodeIn: string | null;
  bakedRange: { first: number; last: number };
  media: { kind: 'version' } | { kind: 'export'; format: string };
}

type ClipMedia = {
  kind: 'clip';
  clipUrl: string;
  statsUrl: string | null;
  plate: { url: string; contentType: string; width: number | null; height: number | null } | null;
  /** The pictures the version's props are drawn as (openParticleSource loads them). */
  propPictures?: PropPictureRef[];
  plateSize: { width: number; height: number };
  metresPerPixel: number | null;
  firstFrame: number;
  /** Shot frame number of the plate's first picture (null: the cut in). */
  plateFirstFrame: number | null;
};
type ExportMedia = { kind: 'export'; format: string; contentType: string; url: string; downloadUrl: string; width: number | null; height: number | null };

async function getJson<T>(path: string, init?: RequestInit): Promise<T> {
  const res = await fetch(path, { credentials: 'same-origin', headers: { accept: 'application/json', 'content-type': 'application/json' }, ...init });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw Object.assign(new Error(body?.error?.message ?? `The server answered ${res.status}`), { fields: body?.error?.fields ?? {} });
  return body as T;
}

const VIEW_WIDTH = 960;

function ClipPlayer({ token, frameRate, tcShot, bakedRange, onFrame }: { token: string; frameRate: string; tcShot: SourceTimecodeShot; bakedRange: Props['bakedRange']; onFrame: (f: number) => void }) {
  const host = useRef<HTMLDivElement>(null);
  const rendererRef = useRef<FrameRenderer | null>(null);
  const [status, setStatus] = useState<'loading' | 'ready' | string>('loading');
  const [frame, setFrame] = useState(bakedRange.first);
  const [playing, setPlaying] = useState(false);
  const [look, setLook] = useState<RenderLook>('surface');
  const frameRef = useRef(frame);
  const drawing = useRef<Promise<void> | null>(null);

  useEffect(() => {
    let cancelled = false;
    let destroyPlate: (() => void) | null = null;
    (async () => {
      const [{ FrameRenderer }, { openParticleSource }] = await Promise.all([import('~/lib/export/frames'), import('~/lib/export/source')]);
      const first = await getJson<ClipMedia>(`/api/shared/${token}/media`);
      const source = await openParticleSource(async () => getJson<ClipMedia>(`/api/shared/${token}/media`));
      let plate: import('~/lib/plate').PlateFrameSource | null = null;
      if (first.plate) {
        try {
          const { openPlate } = await import('~/lib/plate');
          plate = await openPlate({ url: first.plate.url, contentType: first.plate.contentType, shot: first, fps: rateInfo(frameRate).fps });
          destroyPlate = () => plate?.destroy();
        } catch {
          plate = null; // the splash alone still plays
        }
      }
      const ps = first.plateSize;
      const width = VIEW_WIDTH;
      const height = 2 * Math.round((width * ps.height) / ps.width / 2);
      const r = new FrameRenderer({
        width,
        height,
        labels: { studioName: '', showName: '', shotCode: '', versionNumber: 0, artistName: null, date: '', reviewState: '', rateId: frameRate, cutIn: first.firstFrame, sourceTimecodeIn: null },
        look: 'surface',
        source,
        plate,
        plateSize: ps,
        metresPerPixel: first.metresPerPixel,
        burnIns: false,
      });
      if (cancelled) return;
      r.canvas.className = 'block h-auto w-full rounded-lg bg-ink';
      r.canvas.setAttribute('aria-label', 'Preview of the splash');
      r.canvas.dataset.testid = 'shared-canvas';
      host.current!.replaceChildren(r.canvas);
      rendererRef.current = r;
      await r.drawFrame(bakedRange.first);
      if (!cancelled) setStatus('ready');
    })().catch((e) => !cancelled && setStatus(e instanceof Error ? e.message : String(e)));
    return () => {
      cancelled = true;
      destroyPlate?.();
    };
  }, [token, frameRate, bakedRange.first]);

  const show = (f: number) => {
    frameRef.current = f;
    setFrame(f);
    onFrame(f);
    const r = rendererRef.current;
    if (r && !drawing.current) {
      drawing.current = r.drawFrame(f).finally(() => {
        drawing.current = null;
        if (frameRef.current !== f) show(frameRef.current);
      });
    }
  };

  useEffect(() => {
    if (!playing) return;
    const fps = rateInfo(frameRate).fps;
    let raf = 0;
    let last = performance.now();
    const tick = (now: number) => {
      if (now - last >= 1000 / fps && !drawing.current) {
        last = now;
        const next = frameRef.current >= bakedRange.last ? bakedRange.first : frameRef.current + 1;
        show(next);
      }
      raf = requestAnimationFrame(tick);
    };
    raf = requestAnimationFrame(tick);
    return () => cancelAnimationFrame(raf);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [playing]);

  useEffect(() => {
    const r = rendererRef.current;
    if (!r) return;
    r.setLook(look);
    show(frameRef.current);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [look]);

  return (
    <div>
      <div ref={host} className="aspect-video w-full rounded-lg bg-ink" />
      {status !== 'ready' && <p className="mt-2 text-sm text-ink-muted">{status === 'loading' ? 'Loading the preview…' : status}</p>}
      <div className="mt-3 flex flex-wrap items-center gap-3 text-sm">
        <button type="button" className="btn-quiet" disabled={status !== 'ready'} onClick={() => setPlaying((p) => !p)}>
          {playing ? 'Pause' : 'Play'}
        </button>
        <input
          type="range"
          className="min-w-40 flex-1"
          aria-label="Frame"
          min={bakedRange.first}
          max={bakedRange.last}
          value={frame}
          disabled={status !== 'ready'}
          onChange={(e) => {
            setPlaying(false);
            show(Number(e.target.value));
          }}
        />
        <span className="tabular-nums" data-testid="shared-frame">
          {frame} · {sourceTimecodeLabel(tcShot, frame)}
        </span>
        <select className="field-input w-auto" aria-label="Look" value={look} onChange={(e) => setLook(e.target.value as RenderLook)}>
          {RENDER_LOOKS.map((l) => <option key={l} value={l}>{LOOK_LABELS[l]}</option>)}
        </select>
      </div>
    </div>
  );
}

function ExportPlayer({ token }: { token: string }) {
  const [media, setMedia] = useState<ExportMedia | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    getJson<ExportMedia>(`/api/shared/${token}/media`).then(setMedia, (e) => setError(e.message));
  }, [token]);
  if (error) return <p className="field-error">{error}</p>;
  if (!media) return <p className="text-sm text-ink-muted">Loading the preview…</p>;
  return (
    <div>
      {media.format === 'mp4' ? (
        <video src={media.url} controls loop playsInline className="w-full rounded-lg bg-ink" data-testid="shared-video" />
      ) : media.format === 'gif' ? (
        <img src={media.url} alt="Animated preview of the splash" className="w-full rounded-lg bg-ink" />
      ) : null}
      <a className="link mt-2 inline-block text-sm" href={media.downloadUrl}>
        Download the file
      </a>
    </div>
  );
}

export default function SharedViewer({ token, frameRate, cutIn, sourceTimecodeIn, bakedRange, media }: Props) {
  const tcShot: SourceTimecodeShot = { firstFrame: cutIn, frameRate, sourceTimecodeIn };
  const [frame, setFrame] = useState(bakedRange.first);
  const [name, setName] = useState('');
  const [body, setBody] = useState('');
  const [sent, setSent] = useState<{ name: string; body: string; frame: number }[]>([]);
  const [error, setError] = useState<{ message: string; fields: Record<string, string> } | null>(null);
  const [busy, setBusy] = useState(false);

  async function send(e: { preventDefault(): void }) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      const res = await getJson<{ note: { name: string; body: string; frame: number } }>(`/api/shared/${token}/notes`, {
        method: 'POST',
        body: JSON.stringify({ name, body, frame }),
      });
      setSent((s) => [...s, res.note]);
      setBody('');
    } catch (err) {
      setError({ message: err instanceof Error ? err.message : String(err), fields: (err as { fields?: Record<string, string> }).fields ?? {} });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="grid gap-6">
      {media.kind === 'version' ? <ClipPlayer token={token} frameRate={frameRate} tcShot={tcShot} bakedRange={bakedRange} onFrame={setFrame} /> : <ExportPlayer token={token} />}
      <form className="card grid gap-3 p-5 text-sm" onSubmit={send} noValidate data-testid="shared-comment-form">
        <h2 className="text-base font-semibold">Leave a comment for the studio</h2>
        <label>
          <span className="field-label">Your name</span>
          <input className="field-input" name="guestName" value={name} maxLength={80} onChange={(e) => setName(e.target.value)} aria-invalid={!!error?.fields.name || undefined} />
          {error?.fields.name && <span className="field-error">Name {error.fields.name}</span>}
        </label>
        <label>
          <span className="field-label">Comment{media.kind === 'version' ? ` (at frame ${frame}, ${sourceTimecodeLabel(tcShot, frame)})` : ''}</span>
          <textarea className="field-input" name="comment" rows={3} value={body} maxLength={2000} onChange={(e) => setBody(e.target.value)} aria-invalid={!!error?.fields.body || undefined} />
          {error?.fields.body && <span className="field-error">Comment {error.fields.body}</span>}
        </label>
        {error && !Object.keys(error.fields).length && <p className="field-error">{error.message}</p>}
        <div>
          <button type="submit" className="btn-primary" disabled={busy}>
            Send comment
          </button>
        </div>
        {sent.length > 0 && (
          <ul className="grid gap-1 text-ink-soft" data-testid="shared-sent">
            {sent.map((n, i) => (
              <li key={i}>
                Sent: “{n.body}” at frame {frameWithTimecode(tcShot, n.frame)}. The studio will see it with your name.
              </li>
            ))}
          </ul>
        )}
      </form>
    </div>
  );
}
