// The shot's plate: a still or a video, uploaded straight to the object store with a presigned POST (with progress),
// then its thumbnail (made by the server for PNG and JPEG; for video and WebP this browser draws the first frame and
// uploads it as a thumbnail), and the scale calibration — drag a line over something of known size, type its real length, store metres per pixel.
import { useEffect, useRef, useState, type PointerEvent } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { MB, PLATE_LIMITS, STILL_TYPES, VIDEO_TYPES, scaleBody } from '~/lib/library/schemas';
import { api, ApiError, messageOf } from '../shared/api';
import { FormMessage, Spinner } from '../shared/form';
import { bytesLabel, metresLabel } from './format';
import { keys, type AssetInfo, type ShotDetail } from './types';
import { postWithProgress, type UploadForm } from '../shared/upload';

const ACCEPT = [...STILL_TYPES, ...VIDEO_TYPES].join(',');
const isVideo = (type: string) => (VIDEO_TYPES as readonly string[]).includes(type);
const isStill = (type: string) => (STILL_TYPES as readonly string[]).includes(type);

interface Props {
  studioId: number;
  shot: ShotDetail;
  canUpload: boolean;
}

type Point = { x: number; y: number };

/** Reads a video file's size and length with a detached <video> element (the server cannot decode video). */
function measureVideo(file: File): Promise<{ width: number; height: number; durationSeconds: number }> {
  return new Promise((resolve, reject) => {
    const url = URL.createObjectURL(file);
    const video = document.createElement('video');
    video.preload = 'metadata';
    video.muted = true;
    const done = () => URL.revokeObjectURL(url);
    video.onloadedmetadata = () => {
      done();
      resolve({ width: video.videoWidth, height: video.videoHeight, durationSeconds: video.duration });
    };
    video.onerror = () => {
      done();
      reject(new Error(`This browser cannot read “${file.name}” as video. Export it as MP4 (H.264) or WebM and try again.`));
    };
    video.src = url;
  });
}

/** Thumbnail width in pixels (the server makes the same for PNG and JPEG plates). */
const THUMBNAIL_WIDTH = 320;

/** Waits for one of the element's events, or fails on `error` or after `ms`. */
function once(el: HTMLElement, event: string, ms: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => finish(new Error(`timed out waiting for ${event}`)), ms);
    const ok = () => finish();
    const bad = () => finish(new Error('the file could not be decoded'));
    function finish(err?: Error) {
      clearTimeout(timer);
      el.removeEventListener(event, ok);
      el.removeEventListener('error', bad);
      if (err) reject(err);
      else resolve();
    }
    el.addEventListener(event, ok);
    el.addEventListener('error', bad);
  });
}

/**
 * Draws the plate's first frame (a video's, or a still's) 320 px wide, aspect kept, and returns it as a PNG.
 * Used for plates the server cannot decode (video, WebP) or did not.
 */
async function drawThumbnail(file: File): Promise<Blob> {
  const url = URL.createObjectURL(file);
  try {
    let source: CanvasImageSource;
    let w: number;
    let h: number;
    if (isVideo(file.type)) {
      const video = document.createElement('video');
      video.muted = true;
      video.playsInline = true;
      video.preload = 'auto';
      const loaded = once(video, 'loadeddata', 15_000);
      video.src = url;
      await loaded;
      // Make sure the first frame is the one painted (some browsers paint nothing before a seek).
      const seeked = once(video, 'seeked', 3_000).catch(() => undefined);
      video.currentTime = 0;
      await seeked;
      source = video;
      w = video.videoWidth;
      h = video.videoHeight;
    } else {
      const bitmap = await createImageBitmap(file);
      source = bitmap;
      w = bitmap.width;
      h = bitmap.height;
    }
    if (!w || !h) throw new Error('the plate has no picture size');
    const canvas = document.createElement('canvas');
    canvas.width = THUMBNAIL_WIDTH;
    canvas.height = Math.max(1, Math.round((THUMBNAIL_WIDTH * h) / w));
    const ctx = canvas.getContext('2d')!;
    ctx.imageSmoothingEnabled = true;
    ctx.imageSmoothingQuality = 'high';
    ctx.drawImage(source, 0, 0, canvas.width, canvas.height);
    if (source instanceof ImageBitmap) source.close();
    return await new Promise<Blob>((resolve, reject) => canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the browser could not encode the thumbnail'))), 'image/png'));
  } finally {
    URL.revokeObjectURL(url);
  }
}

export default function PlatePanel({ studioId, shot, canUpload }: Props) {
  const queryClient = useQueryClient();
  const fileInput = useRef<HTMLInputElement>(null);
  const [upload, setUpload] = useState<{ name: string; fraction: number; stage: 'sending' | 'checking' } | null>(null);
  const [uploadError, setUploadError] = useState('');
  const [uploadDone, setUploadDone] = useState('');

  const plate = useQuery({
    queryKey: keys.plate(studioId, shot.plateAssetId ?? 0),
    queryFn: () => api<{ asset: AssetInfo & { durationSeconds: number | null }; url: string }>(`/api/studios/${studioId}/plates/${shot.plateAssetId}`),
    enabled: !!shot.plateAssetId,
    staleTime: 4 * 60_000, // the view URL lives 5 minutes
    refetchOnWindowFocus: false,
  });

  /** Draws the plate's thumbnail in this browser and uploads it through the thumbnail flow. */
  const sendThumbnail = async (file: File) => {
    const png = await drawThumbnail(file);
    const started = await api<{ assetId: number; upload: UploadForm }>(`/api/studios/${studioId}/shots/${shot.id}/plates`, {
      method: 'POST',
      body: { fileName: `${file.name.replace(/\.[^.]*$/, '')}-thumbnail.png`, contentType: 'image/png', byteSize: png.size, kind: 'thumbnail' },
    });
    await postWithProgress(started.upload, png, () => undefined);
    await api(`/api/studios/${studioId}/plates/${started.assetId}/complete`, { method: 'POST', body: {} });
  };

  const onFile = async (file: File | undefined) => {
    if (fileInput.current) fileInput.current.value = '';
    if (!file) return;
    setUploadError('');
    setUploadDone('');
    const type = file.type;
    if (!isStill(type) && !isVideo(type)) {
      setUploadError(`“${file.name}” is not a plate Tidemark can use: send a PNG, JPEG or WebP still, or an MP4, QuickTime or WebM video.`);
      return;
    }
    const limit = isVideo(type) ? PLATE_LIMITS.video : PLATE_LIMITS.still;
    if (file.size > limit) {
      setUploadError(`“${file.name}” is ${bytesLabel(file.size)}: a ${isVideo(type) ? 'video' : 'still'} plate may be at most ${Math.round(limit / MB)} MB.`);
      return;
    }
    if (file.size === 0) {
      setUploadError(`“${file.name}” is empty.`);
      return;
    }
    try {
      setUpload({ name: file.name, fraction: 0, stage: 'sending' });
      const measured = isVideo(type) ? await measureVideo(file) : {};
      const started = await api<{ assetId: number; upload: UploadForm }>(`/api/studios/${studioId}/shots/${shot.id}/plates`, {
        method: 'POST',
        body: { fileName: file.name, contentType: type, byteSize: file.size, kind: 'plate' },
      });
      await postWithProgress(started.upload, file, (fraction) => setUpload({ name: file.name, fraction, stage: 'sending' }));
      setUpload({ name: file.name, fraction: 1, stage: 'checking' });
      const completed = await api<{ asset: AssetInfo; thumbnail: { id: number } | null }>(`/api/studios/${studioId}/plates/${started.assetId}/complete`, {
        method: 'POST',
        body: measured,
      });
      const done = `New plate: ${file.name}${completed.asset.width ? `, ${completed.asset.width}×${completed.asset.height}` : ''}. Versions already blocked keep the plate they were made on.`;
      setUploadDone(done);
      await queryClient.invalidateQueries({ queryKey: keys.shot(studioId, shot.id) });
      void queryClient.invalidateQueries({ queryKey: keys.allShots(studioId) });
      void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
      if (!completed.thumbnail) {
        // The server could not make the thumbnail (video, WebP): draw the first frame here and send it.
        try {
          await sendThumbnail(file);
          await queryClient.invalidateQueries({ queryKey: keys.shot(studioId, shot.id) });
          void queryClient.invalidateQueries({ queryKey: keys.allShots(studioId) });
          void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
        } catch (err) {
          setUploadDone(`${done} No thumbnail could be made from it (${messageOf(err)}).`);
        }
      }
    } catch (err) {
      setUploadError(err instanceof ApiError && Object.keys(err.fields).length && !err.message.includes(':') ? `${err.message} (${Object.values(err.fields).join('; ')})` : messageOf(err));
    } finally {
      setUpload(null);
    }
  };

  const asset = plate.data?.asset;
  const width = asset?.width ?? shot.plateWidth;
  const height = asset?.height ?? shot.plateHeight;

  return (
    <section aria-labelledby="plate-heading" className="card overflow-hidden">
      <div className="flex flex-wrap items-center justify-between gap-3 border-b border-sand-line px-5 py-3">
        <h2 id="plate-heading" className="font-semibold">
          Plate
          {asset && (
            <span className="ml-2 text-sm font-normal text-ink-muted">
              {asset.width}×{asset.height} · {asset.format?.toUpperCase()} · {bytesLabel(asset.byteSize)}
            </span>
          )}
        </h2>
        {canUpload && (
          <>
            <button type="button" className="btn-quiet px-3 py-1.5" disabled={!!upload} onClick={() => fileInput.current?.click()}>
              {shot.plateAssetId ? 'Replace plate…' : 'Upload plate…'}
            </button>
            <input ref={fileInput} type="file" accept={ACCEPT} className="sr-only" tabIndex={-1} aria-label="Plate file" data-testid="plate-file" onChange={(e) => void onFile(e.target.files?.[0])} />
          </>
        )}
      </div>
      {(upload || uploadError || uploadDone) && (
        <div className="space-y-2 px-5 pt-4" aria-live="polite">
          {upload && (
            <div>
              <div className="flex justify-between text-sm">
                <span className="truncate">{upload.stage === 'sending' ? `Uploading ${upload.name}` : `Checking ${upload.name}`}</span>
                <span className="tabular-nums text-ink-muted">{Math.round(upload.fraction * 100)}%</span>
              </div>
              <progress className="mt-1 h-2 w-full overflow-hidden rounded-full accent-harbour-500" max={1} value={upload.stage === 'checking' ? undefined : upload.fraction} aria-label="Upload progress" />
            </div>
          )}
          {uploadError && <FormMessage>{uploadError}</FormMessage>}
          {uploadDone && <FormMessage tone="success">{uploadDone}</FormMessage>}
        </div>
      )}
      <div className="p-5">
        {!shot.plateAssetId ? (
          <div className="grid aspect-video place-items-center rounded-lg border-2 border-dashed border-sand-line bg-sand/60 p-6 text-center text-ink-soft">
            <div>
              <p className="font-medium text-ink">No plate yet</p>
              <p className="mt-1 max-w-sm text-sm">
                {canUpload
                  ? `Upload the plate to block against: a PNG, JPEG or WebP still (up to ${PLATE_LIMITS.still / MB} MB) or a short video (up to ${PLATE_LIMITS.video / MB} MB).`
                  : 'An artist or supervisor uploads the plate for this shot.'}
              </p>
            </div>
          </div>
        ) : plate.isLoading ? (
          <div className="grid aspect-video place-items-center rounded-lg bg-sand/60 text-harbour-600">
            <Spinner />
          </div>
        ) : plate.error ? (
          <FormMessage>Could not load the plate: {messageOf(plate.error)}</FormMessage>
        ) : plate.data ? (
          <Calibrator
            studioId={studioId}
            shot={shot}
            url={plate.data.url}
            video={isVideo(plate.data.asset.contentType)}
            width={width}
            height={height}
            canCalibrate={canUpload}
            onExpired={() => void plate.refetch()}
          />
        ) : null}
      </div>
    </section>
  );
}

/** The plate with the measuring overlay and the scale readout. */
function Calibrator({
  studioId,
  shot,
  url,
  video,
  width,
  height,
  canCalibrate,
  onExpired,
}: {
  studioId: number;
  shot: ShotDetail;
  url: string;
  video: boolean;
  width: number;
  height: number;
  canCalibrate: boolean;
  onExpired: () => void;
}) {
  const queryClient = useQueryClient();
  const svg = useRef<SVGSVGElement>(null);
  const [measuring, setMeasuring] = useState(false);
  const [line, setLine] = useState<{ a: Point; b: Point } | null>(null);
  const [dragging, setDragging] = useState(false);
  const [metres, setMetres] = useState('');
  const [error, setError] = useState('');
  useEffect(() => {
    if (!measuring) setLine(null);
  }, [measuring]);

  const toPlate = (e: PointerEvent): Point => {
    const box = svg.current!.getBoundingClientRect();
    const x = ((e.clientX - box.left) / box.width) * width;
    const y = ((e.clientY - box.top) / box.height) * height;
    return { x: Math.max(0, Math.min(width, x)), y: Math.max(0, Math.min(height, y)) };
  };
  const pixels = line ? Math.hypot(line.b.x - line.a.x, line.b.y - line.a.y) : 0;

  const save = useMutation({
    mutationFn: (body: { pixels: number; metres: number }) => api<{ scale: { metresPerPixel: number } }>(`/api/studios/${studioId}/shots/${shot.id}/scale`, { method: 'POST', body }),
    onSuccess: (answer) => {
      queryClient.setQueryData<ShotDetail>(keys.shot(studioId, shot.id), (old) => (old ? { ...old, metresPerPixel: answer.scale.metresPerPixel } : old));
      void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
      setMeasuring(false);
      setMetres('');
    },
    onError: (err) => setError(messageOf(err)),
  });

  const submit = () => {
    setError('');
    const parsed = scaleBody.safeParse({ pixels: Math.round(pixels * 100) / 100, metres: Number(metres.replace(',', '.')) });
    if (!parsed.success) {
      const issue = parsed.error.issues[0]!;
      setError(`${issue.path[0] === 'pixels' ? 'The line' : 'Real length'} ${issue.message}`);
      return;
    }
    if (pixels < 4) {
      setError('Draw a longer line: drag across the whole object on the plate.');
      return;
    }
    save.mutate(parsed.data);
  };

  const strokeWidth = Math.max(2, width / 400);
  const mpp = shot.metresPerPixel;
  return (
    <div className="space-y-4">
      <div className="relative overflow-hidden rounded-lg bg-ink" style={{ aspectRatio: `${width * (shot.pixelAspect || 1)} / ${height}` }}>
        {video ? (
          <video src={url} controls={!measuring} muted playsInline preload="metadata" className="absolute inset-0 size-full" data-testid="plate-video" onError={onExpired} />
        ) : (
          <img src={url} alt={`Plate of ${shot.code}`} className="absolute inset-0 size-full" data-testid="plate-image" onError={onExpired} draggable={false} />
        )}
        <svg
          ref={svg}
          viewBox={`0 0 ${width} ${height}`}
          preserveAspectRatio="none"
          data-testid="plate-overlay"
          aria-hidden={!measuring}
          className={`absolute inset-0 size-full touch-none ${measuring ? 'cursor-crosshair' : 'pointer-events-none'}`}
          onPointerDown={(e) => {
            if (!measuring) return;
            (e.target as Element).setPointerCapture?.(e.pointerId);
            const p = toPlate(e);
            setLine({ a: p, b: p });
            setDragging(true);
          }}
          onPointerMove={(e) => dragging && setLine((l) => (l ? { ...l, b: toPlate(e) } : l))}
          onPointerUp={(e) => {
            if (!dragging) return;
            setDragging(false);
            setLine((l) => (l ? { ...l, b: toPlate(e) } : l));
          }}
        >
          {line && (
            <g>
              <line x1={line.a.x} y1={line.a.y} x2={line.b.x} y2={line.b.y} stroke="#13232b" strokeOpacity="0.6" strokeWidth={strokeWidth * 2.2} strokeLinecap="round" vectorEffect="non-scaling-stroke" />
              <line x1={line.a.x} y1={line.a.y} x2={line.b.x} y2={line.b.y} stroke="#ffd166" strokeWidth={strokeWidth} strokeLinecap="round" strokeDasharray="8 5" vectorEffect="non-scaling-stroke" />
              {[line.a, line.b].map((p, i) => (
                <circle key={i} cx={p.x} cy={p.y} r={strokeWidth * 2.5} fill="#ffd166" stroke="#13232b" strokeWidth={1} vectorEffect="non-scaling-stroke" />
              ))}
            </g>
          )}
        </svg>
        {measuring && !line && (
          <p className="pointer-events-none absolute inset-x-0 top-3 mx-auto w-fit rounded-full bg-ink/80 px-3 py-1 text-xs text-sand">
            Drag across something whose real length you know
          </p>
        )}
      </div>

      <div className="flex flex-wrap items-start justify-between gap-4" data-testid="scale">
        <div>
          <h3 className="text-sm font-semibold">Scale</h3>
          {mpp ? (
            <p className="mt-0.5 text-sm text-ink-soft" data-testid="scale-readout">
              <span className="font-medium text-ink tabular-nums">{mpp.toPrecision(4)} m</span> per pixel · the plate is{' '}
              <span className="font-medium text-ink tabular-nums">{metresLabel(mpp * width)}</span> wide and {metresLabel(mpp * height)} high
            </p>
          ) : (
            <p className="mt-0.5 text-sm text-ink-muted" data-testid="scale-readout">
              Not calibrated: the tank’s metres are not tied to this plate yet.
            </p>
          )}
        </div>
        {canCalibrate && !measuring && (
          <button type="button" className="btn-quiet px-3 py-1.5" onClick={() => setMeasuring(true)}>
            {mpp ? 'Recalibrate' : 'Calibrate scale'}
          </button>
        )}
      </div>

      {measuring && (
        <form
          className="flex flex-wrap items-end gap-3 rounded-lg bg-harbour-50 p-3"
          aria-label="Calibrate scale"
          onSubmit={(e) => {
            e.preventDefault();
            submit();
          }}
        >
          <p className="min-w-[10rem] flex-1 text-sm text-harbour-900">
            {line && pixels > 0 ? (
              <>
                Line: <strong className="tabular-nums">{pixels.toFixed(1)} px</strong>
                {metres && Number(metres) > 0 && (
                  <span className="block text-xs">
                    → {(Number(metres) / pixels).toPrecision(4)} m per pixel, plate {metresLabel((Number(metres) / pixels) * width)} wide
                  </span>
                )}
              </>
            ) : (
              'Draw a line on the plate, then give its real length.'
            )}
          </p>
          <label className="text-sm">
            <span className="field-label">Real length (m)</span>
            <input type="text" inputMode="decimal" value={metres} onChange={(e) => setMetres(e.target.value)} className="field-input w-32" placeholder="e.g. 2.4" aria-invalid={error ? true : undefined} />
          </label>
          <button type="submit" className="btn-primary" disabled={!line || save.isPending}>
            {save.isPending && <Spinner />}
            Save scale
          </button>
          <button type="button" className="btn-quiet" onClick={() => setMeasuring(false)}>
            Cancel
          </button>
          {error && (
            <p className="field-error w-full" role="alert">
              {error}
            </p>
          )}
        </form>
      )}
    </div>
  );
}
