// The Export panel of a version: choose format, frames, size, look, plate, slate, burn-ins and loop; render and encode
// in this browser with a staged progress bar, ETA and Cancel; the file is downloaded and stored on the version, and
// the version's stored exports are listed with who made them, when, and a download link.
import { useCallback, useEffect, useRef, useState } from 'react';
import { rateInfo, rateText } from '~/lib/timecode';
import { reviewStateWord } from '~/lib/vocab';
import { LOOK_LABELS, RENDER_LOOKS, type RenderLook } from '~/lib/render/looks';
import { SHUTTER_ANGLES, shutterLabel } from '~/lib/render/motionBlur';
import {
  DEFAULT_SLATE_SECONDS,
  EXPORT_FORMATS,
  exportFileName,
  slateFrameCount,
  FORMAT_LABELS,
  outputSize,
  resolveRange,
  type ExportFormat,
  type ExportLabels,
  type RangeChoice,
  type SizeChoice,
} from '~/lib/export/layout';
import { formatEta, STAGE_LABELS, type ProgressReport } from '~/lib/export/progress';
import { rangeWithHandles } from '~/lib/library/handles';
import { EXPORT_STORED_EVENT, listExports, storeExport, type StoredExport } from '~/lib/export/store';

export interface ExportPanelProps {
  versionId: number;
  studioId: number;
  studioName: string;
  showName: string;
  showCode?: string;
  shotCode: string;
  versionNumber: number;
  artistName: string | null;
  reviewState: string;
  /** The shot's cut in and cut out, head and tail handles, in shot frames. */
  firstFrame: number;
  lastFrame: number;
  headHandles: number;
  tailHandles: number;
  /** Shot frame number of the plate's first frame (null: the cut in): a video plate is seeked by it. */
  plateFirstFrame: number | null;
  /** Frame rate id of the shot, e.g. '24' or '29.97df'. */
  frameRate: string;
  /** Source timecode at the cut in, and where the shot sits in the cut (burn-ins and slate print these). */
  sourceTimecodeIn: string | null;
  recordIn: string | null;
  recordOut: string | null;
  /** The shot's plate size in pixels (the export's full resolution) and scale. */
  plateWidth: number;
  plateHeight: number;
  metresPerPixel: number | null;
  /** The version's plate asset, when it has one (drawn under the splash when "plate underlay" is on). */
  plate: { assetId: number; contentType: string } | null;
}

type RangeKind = RangeChoice['kind'];
type SizeKind = SizeChoice['kind'];
type RunState =
  | { kind: 'idle' }
  | { kind: 'running'; report: ProgressReport }
  | { kind: 'done'; fileName: string; url: string; format: ExportFormat; byteSize: number; frames: number; stored: StoredExport | null; storeError?: string }
  | { kind: 'cancelled' }
  | { kind: 'error'; message: string };

const bytesLabel = (n: number) => (n >= 1024 * 1024 ? `${(n / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(n / 1024))} KB`);
const whenLabel = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });

export default function ExportPanel(p: ExportPanelProps) {
  const [format, setFormat] = useState<ExportFormat>('mp4');
  const [rangeKind, setRangeKind] = useState<RangeKind>('shot');
  const [inFrame, setInFrame] = useState(p.firstFrame);
  const [outFrame, setOutFrame] = useState(p.lastFrame);
  const [sizeKind, setSizeKind] = useState<SizeKind>('half');
  const [width, setWidth] = useState(960);
  const [look, setLook] = useState<RenderLook>('surface');
  // Off by default: a review copy shows each baked frame sharp, which is how a supervisor judges the splash's timing;
  // blur is for a client or comp copy and is asked for.
  const [shutterAngle, setShutterAngle] = useState(0);
  const [plateOn, setPlateOn] = useState(!!p.plate);
  const [slate, setSlate] = useState(true);
  const [slateSeconds, setSlateSeconds] = useState(DEFAULT_SLATE_SECONDS);
  // a re-export under a file name already stored with the version: a numbered name, or replace the earlier one
  const [sameName, setSameName] = useState<'number' | 'replace'>('number');
  const [burnIns, setBurnIns] = useState(true);
  const [loop, setLoop] = useState(true);
  const [run, setRun] = useState<RunState>({ kind: 'idle' });
  const [stored, setStored] = useState<StoredExport[] | null>(null);
  const [listError, setListError] = useState<string | null>(null);
  const abortRef = useRef<AbortController | null>(null);
  // set on the first click, before React re-renders the disabled button: a double click starts one export
  const startedRef = useRef(false);
  const urlRef = useRef<string | null>(null);

  const refreshList = useCallback(() => {
    listExports(p.versionId)
      .then((list) => {
        setStored(list);
        setListError(null);
      })
      .catch((e) => setListError(e instanceof Error ? e.message : String(e)));
  }, [p.versionId]);
  useEffect(refreshList, [refreshList]);
  useEffect(
    () => () => {
      abortRef.current?.abort();
      if (urlRef.current) URL.revokeObjectURL(urlRef.current);
    },
    [],
  );

  let rangeError: string | null = null;
  let range = { first: p.firstFrame, last: p.lastFrame };
  try {
    const choice: RangeChoice = rangeKind === 'custom' ? { kind: 'custom', first: inFrame, last: outFrame } : { kind: rangeKind };
    range = resolveRange(choice, p);
  } catch (e) {
    rangeError = e instanceof Error ? e.message : String(e);
  }
  const withHandles = rangeWithHandles(p);
  const sizeChoice: SizeChoice = sizeKind === 'width' ? { kind: 'width', width } : { kind: sizeKind };
  // Comp passes go out at plate resolution, without plate, slate or burn-ins (they are laid over the plate in comp).
  const passes = format === 'passes';
  const size = outputSize(passes ? { kind: 'full' } : sizeChoice, p.plateWidth, p.plateHeight);
  const slateOk = slateSeconds >= 0.1 && slateSeconds <= 10;
  const slateFrames = slate && !passes ? slateFrameCount(rateInfo(p.frameRate).fps, slateOk ? slateSeconds : DEFAULT_SLATE_SECONDS) : 0;
  const frameCount = range.last - range.first + 1 + slateFrames;
  const running = run.kind === 'running';
  const nextName = exportFileName({ showCode: p.showCode, shotCode: p.shotCode, versionNumber: p.versionNumber }, range.first, range.last, format);
  const nameTaken = !!stored?.some((e) => e.fileName === nextName);

  async function start() {
    if (rangeError || running || startedRef.current || (slate && !passes && !slateOk)) return;
    startedRef.current = true;
    try {
      await runOnce();
    } finally {
      startedRef.current = false;
    }
  }

  async function runOnce() {
    const controller = new AbortController();
    abortRef.current = controller;
    setRun({ kind: 'running', report: { stage: 'preparing', stageFraction: 0, fraction: 0, etaSeconds: null, detail: '' } });
    const [{ runExport, CancelledError }, { openParticleSource }] = await Promise.all([import('~/lib/export/engine'), import('~/lib/export/source')]);
    let plateSource: import('~/lib/plate').PlateFrameSource | null = null;
    try {
      const source = await openParticleSource(async () => {
        const res = await fetch(`/api/versions/${p.versionId}/clip`, { headers: { accept: 'application/json' } });
        const body = await res.json();
        if (!res.ok) throw new Error(body?.error?.message ?? `Could not open the baked clip (${res.status})`);
        return body;
      });
      if (plateOn && p.plate && !passes) {
        const { openPlate } = await import('~/lib/plate');
        const res = await fetch(`/api/studios/${p.studioId}/plates/${p.plate.assetId}`);
        const body = await res.json();
        if (!res.ok) throw new Error(body?.error?.message ?? 'Could not open the plate');
        plateSource = await openPlate({ url: body.url, contentType: p.plate.contentType, shot: p, fps: rateInfo(p.frameRate).fps });
      }
      const labels: ExportLabels = {
        studioName: p.studioName,
        showName: p.showName,
        showCode: p.showCode,
        shotCode: p.shotCode,
        versionNumber: p.versionNumber,
        artistName: p.artistName,
        date: new Date().toISOString().slice(0, 10),
        reviewState: reviewStateWord(p.reviewState),
        rateId: p.frameRate,
        cutIn: p.firstFrame,
        sourceTimecodeIn: p.sourceTimecodeIn,
        recordIn: p.recordIn,
        recordOut: p.recordOut,
      };
      const result = await runExport(
        {
          format,
          labels,
          first: range.first,
          last: range.last,
          width: size.width,
          height: size.height,
          look,
          slate: slate && !passes,
          slateSeconds,
          burnIns: burnIns && !passes,
          loop,
          shutterAngle,
          source,
          plate: plateSource,
          plateSize: { width: p.plateWidth, height: p.plateHeight },
          metresPerPixel: p.metresPerPixel,
        },
        (report) => setRun({ kind: 'running', report }),
        controller.signal,
      );
      if (urlRef.current) URL.revokeObjectURL(urlRef.current);
      const url = URL.createObjectURL(new Blob([result.bytes as BlobPart], { type: result.contentType }));
      urlRef.current = url;
      setRun({ kind: 'running', report: { stage: 'uploading', stageFraction: 0, fraction: 0.97, etaSeconds: null, detail: 'uploading' } });
      let storedExport: StoredExport | null = null;
      let storeError: string | undefined;
      try {
        storedExport = await storeExport(
          p.versionId,
          {
            format,
            bytes: result.bytes,
            fileName: result.fileName,
            sameName,
            options: { first: range.first, last: range.last, width: size.width, height: size.height, look, slate: slate && !passes, ...(slate && !passes ? { slateSeconds } : {}), burnIns: burnIns && !passes, plate: !!plateSource, ...(format === 'gif' ? { loop } : {}), ...(shutterAngle > 0 ? { shutterAngle } : {}), frameCount: result.frameCount },
          },
          (f) => setRun({ kind: 'running', report: { stage: 'uploading', stageFraction: f, fraction: 0.97 + 0.03 * f, etaSeconds: null, detail: `${Math.round(f * 100)} %` } }),
          controller.signal,
        );
        window.dispatchEvent(new CustomEvent(EXPORT_STORED_EVENT, { detail: storedExport }));
        refreshList();
      } catch (e) {
        if (e instanceof CancelledError) throw e;
        storeError = e instanceof Error ? e.message : String(e);
      }
      setRun({ kind: 'done', fileName: result.fileName, url, format, byteSize: result.bytes.byteLength, frames: result.frameCount, stored: storedExport, storeError });
    } catch (e) {
      if (e instanceof CancelledError || controller.signal.aborted) setRun({ kind: 'cancelled' });
      else setRun({ kind: 'error', message: e instanceof Error ? e.message : String(e) });
    } finally {
      plateSource?.destroy();
      abortRef.current = null;
    }
  }

  const report = run.kind === 'running' ? run.report : null;
  const percent = run.kind === 'done' ? 100 : report ? Math.round(report.fraction * 100) : 0;

  return (
    <section className="card p-5" data-testid="export-panel" aria-labelledby="export-panel-title">
      <h2 id="export-panel-title" className="text-lg font-semibold tracking-tight">
        Export
      </h2>
      <p className="mt-1 text-sm text-ink-muted">Rendered in this browser, then stored with the version.</p>

      <fieldset className="mt-4" disabled={running}>
        <legend className="field-label">Format</legend>
        <div className="flex flex-wrap gap-3 text-sm">
          {EXPORT_FORMATS.map((f) => (
            <label key={f} className="inline-flex items-center gap-1.5">
              <input type="radio" name="export-format" value={f} checked={format === f} onChange={() => setFormat(f)} />
              {FORMAT_LABELS[f]}
            </label>
          ))}
        </div>
      </fieldset>

      <fieldset className="mt-4" disabled={running}>
        <legend className="field-label">Frames</legend>
        <select className="field-input" aria-label="Frame range" value={rangeKind} onChange={(e) => setRangeKind(e.target.value as RangeKind)}>
          <option value="shot">
            Cut range {p.firstFrame}–{p.lastFrame}
          </option>
          <option value="handles">
            With handles {withHandles.first}–{withHandles.last} (head {p.headHandles}, tail {p.tailHandles})
          </option>
          <option value="custom">In and out…</option>
        </select>
        {rangeKind === 'custom' && (
          <div className="mt-2 flex gap-3">
            <label className="text-sm">
              In
              <input className="field-input" type="number" aria-label="In frame" value={inFrame} onChange={(e) => setInFrame(Number(e.target.value))} />
            </label>
            <label className="text-sm">
              Out
              <input className="field-input" type="number" aria-label="Out frame" value={outFrame} onChange={(e) => setOutFrame(Number(e.target.value))} />
            </label>
          </div>
        )}
        {rangeError && <p className="field-error">{rangeError}</p>}
      </fieldset>

      {passes && (
        <p className="mt-2 text-sm text-ink-muted" data-testid="passes-note">
          Two PNGs a frame at plate resolution, named by frame number: the splash over transparency and a white-on-black liquid
          matte, with a README.txt naming them. No plate, slate or burn-ins.
        </p>
      )}

      <fieldset className="mt-4" disabled={running || passes}>
        <legend className="field-label">Size</legend>
        <div className="flex flex-wrap items-center gap-3">
          <select className="field-input w-auto" aria-label="Size" value={passes ? 'full' : sizeKind} onChange={(e) => setSizeKind(e.target.value as SizeKind)}>
            <option value="full">
              Plate resolution {outputSize({ kind: 'full' }, p.plateWidth, p.plateHeight).width}×{outputSize({ kind: 'full' }, p.plateWidth, p.plateHeight).height}
            </option>
            <option value="half">Half</option>
            <option value="width">Width…</option>
          </select>
          {sizeKind === 'width' && !passes && (
            <input className="field-input w-28" type="number" min={64} max={3840} step={2} aria-label="Width in pixels" value={width} onChange={(e) => setWidth(Number(e.target.value))} />
          )}
          <span className="text-sm text-ink-muted" data-testid="export-size">
            {size.width}×{size.height} px
          </span>
        </div>
      </fieldset>

      <fieldset className="mt-4 grid grid-cols-2 gap-2 text-sm" disabled={running}>
        <legend className="field-label">Picture</legend>
        <label className="col-span-2 flex items-center gap-2">
          Look
          <select className="field-input w-auto" aria-label="Render look" value={look} onChange={(e) => setLook(e.target.value as RenderLook)}>
            {RENDER_LOOKS.map((l) => (
              <option key={l} value={l}>
                {LOOK_LABELS[l]}
              </option>
            ))}
          </select>
        </label>
        <label className="col-span-2 flex items-center gap-2">
          <span className="whitespace-nowrap">Motion blur</span>
          <select className="field-input w-auto" aria-label="Motion blur" value={shutterAngle} onChange={(e) => setShutterAngle(Number(e.target.value))}>
            {SHUTTER_ANGLES.map((a) => (
              <option key={a} value={a}>
                {shutterLabel(a)}
              </option>
            ))}
          </select>
        </label>
        {shutterAngle > 0 && (
          <p className="col-span-2 text-xs text-ink-muted" data-testid="motion-blur-note">
            Props blur along the path the bake gives them. The liquid blurs along its motion as estimated from how it moves
            between baked frames (a clip keeps no particle identities), so its blur is an estimate.
          </p>
        )}
        <label className="flex items-center gap-1.5">
          <input type="checkbox" checked={plateOn && !passes} disabled={!p.plate || passes} onChange={(e) => setPlateOn(e.target.checked)} /> Plate underlay
        </label>
        <label className="flex items-center gap-1.5">
          <input type="checkbox" checked={slate && !passes} disabled={passes} onChange={(e) => setSlate(e.target.checked)} /> Slate first
        </label>
        {slate && !passes && (
          <label className="col-span-2 flex items-center gap-1.5">
            Slate held for
            <input
              className="field-input w-20"
              type="number"
              min={0.1}
              max={10}
              step={0.1}
              aria-label="Slate hold in seconds"
              value={slateSeconds}
              onChange={(e) => setSlateSeconds(Number(e.target.value))}
            />
            s <span className="text-ink-muted" data-testid="slate-frames">({slateFrames} frames)</span>
            {!slateOk && <span className="field-error">between 0.1 and 10 s</span>}
          </label>
        )}
        <label className="flex items-center gap-1.5">
          <input type="checkbox" checked={burnIns && !passes} disabled={passes} onChange={(e) => setBurnIns(e.target.checked)} /> Burn-ins
        </label>
        {format === 'gif' && (
          <label className="flex items-center gap-1.5">
            <input type="checkbox" checked={loop} onChange={(e) => setLoop(e.target.checked)} /> Loop
          </label>
        )}
      </fieldset>

      {nameTaken && (
        <fieldset className="mt-4 text-sm" disabled={running} data-testid="same-name">
          <legend className="field-label">{nextName} is already stored with this version</legend>
          <label className="mr-4 inline-flex items-center gap-1.5">
            <input type="radio" name="export-same-name" checked={sameName === 'number'} onChange={() => setSameName('number')} /> Keep both (numbered name)
          </label>
          <label className="inline-flex items-center gap-1.5">
            <input type="radio" name="export-same-name" checked={sameName === 'replace'} onChange={() => setSameName('replace')} /> Replace the earlier one
          </label>
        </fieldset>
      )}

      <div className="mt-5 flex items-center gap-3">
        <button type="button" className="btn-primary" disabled={running || !!rangeError || (slate && !passes && !slateOk)} onClick={() => void start()}>
          Export {format === 'zip' ? 'PNG ZIP' : passes ? 'comp passes' : format.toUpperCase()}
        </button>
        {running && (
          <button type="button" className="btn-quiet" onClick={() => abortRef.current?.abort()}>
            Cancel
          </button>
        )}
        <span className="text-sm text-ink-muted">
          {frameCount} frames at {rateText(p.frameRate)}
        </span>
      </div>

      {(running || run.kind === 'done') && (
        <div className="mt-4" data-testid="export-progress">
          <div className="flex justify-between text-sm">
            <span data-testid="export-stage">{run.kind === 'done' ? 'Finished' : report ? `${STAGE_LABELS[report.stage]}${report.detail ? ` · ${report.detail}` : ''}` : ''}</span>
            <span className="text-ink-muted">{report ? formatEta(report.etaSeconds) : ''}</span>
          </div>
          <div
            role="progressbar"
            aria-label="Export progress"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={percent}
            className="mt-1 h-2 overflow-hidden rounded-full bg-sand-deep"
          >
            <div className="h-full bg-harbour-500 transition-[width]" style={{ width: `${percent}%` }} />
          </div>
        </div>
      )}
      {run.kind === 'done' && (
        <p className="mt-3 text-sm" data-testid="export-done">
          {run.fileName} · {bytesLabel(run.byteSize)} · {run.frames} frames.{' '}
          <a className="link" href={run.url} download={run.fileName} data-testid="export-download">
            Download
          </a>
          {run.stored ? <span className="text-ink-muted"> Stored with the version.</span> : <span className="text-coral-700"> Not stored: {run.storeError}</span>}
        </p>
      )}
      {run.kind === 'cancelled' && <p className="mt-3 text-sm text-ink-muted">Export cancelled.</p>}
      {run.kind === 'error' && (
        <p className="field-error" role="alert">
          {run.message}
        </p>
      )}

      <h3 className="mt-6 text-sm font-semibold">Stored exports</h3>
      {listError && <p className="field-error">{listError}</p>}
      {stored && stored.length === 0 && <p className="mt-1 text-sm text-ink-muted">None yet.</p>}
      {stored && stored.length > 0 && (
        <ul className="mt-2 divide-y divide-sand-line text-sm" data-testid="export-list">
          {stored.map((e) => (
            <li key={e.id} className="flex flex-wrap items-baseline justify-between gap-2 py-2">
              <span>
                <span className="font-medium">{e.format === 'passes' ? 'Comp passes' : e.format.toUpperCase()}</span> {e.width}×{e.height} · {bytesLabel(e.byteSize)}
                <span className="block text-ink-muted">
                  {e.createdBy ?? 'Someone'} · {whenLabel(e.createdAt)}
                </span>
              </span>
              <a className="link" href={e.downloadUrl} data-testid="stored-export-download">
                Download {e.fileName}
              </a>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
