// Import shots into a show from an edit: paste or open a CMX 3600 EDL or a CSV, choose how codes and frames are made,
// preview what would be created, changed (old → new frame range) or left alone, which events make no shot (sound,
// black) and which lines could not be read; adjust the default codes, tick range changes of approved shots, then
// confirm (one transaction on the server).
import { useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { importBody, MAX_IMPORT_BYTES } from '~/lib/library/schemas';
import { api, ApiError } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton, Spinner } from '../shared/form';
import { InputField, toNumber } from './fields';
import { CutRange, handlesText } from './CutRange';
import { rateText } from '~/lib/timecode';
import { DEFAULT_FIRST_FRAME, DEFAULT_HANDLES } from '~/lib/library/handles';
import type { ShotSource, SkippedEvent } from '~/lib/edl/preview';
import type { ShowDetail, Viewer } from './types';

type Input = z.input<typeof importBody>;
type Output = z.output<typeof importBody>;
const FIELDS = ['format', 'text', 'options.codeFrom', 'options.pattern', 'options.headHandles', 'options.tailHandles', 'options.startFrame'] as const;

interface Range {
  first: number;
  last: number;
  headHandles: number;
  tailHandles: number;
}
interface Planned {
  line: number;
  code: string;
  firstFrame: number;
  lastFrame: number;
  headHandles: number;
  tailHandles: number;
  source?: ShotSource;
}
interface Preview {
  frameRate: string;
  create: (Planned & { description: string | null })[];
  update: { id: number; line: number; code: string; from: Range; to: Range; source?: ShotSource; approved: boolean }[];
  unchanged: (Planned & { id: number })[];
  errors: { line: number; message: string }[];
  skipped: SkippedEvent[];
  summary: { create: number; update: number; unchanged: number; errors: number; skipped: number; approvedChanges: number };
}
interface Done {
  created: { id: number; code: string }[];
  kept: { id: number; code: string }[];
  summary: Preview['summary'];
}

export default function ImportScreen({ viewer, show }: { viewer: Viewer; show: ShowDetail }) {
  const { studioId, studioSlug, handleConvention: convention } = viewer;
  const [message, setMessage] = useState('');
  const [preview, setPreview] = useState<{ data: Preview; body: Output } | null>(null);
  const [done, setDone] = useState<Done | null>(null);
  const [skipErrors, setSkipErrors] = useState(false);
  const [confirming, setConfirming] = useState(false);
  /** Codes typed over the defaults, by line; sent with the next preview and the confirm. */
  const [codes, setCodes] = useState<Record<string, string>>({});
  /** Approved shots whose range change the user ticked. */
  const [ticked, setTicked] = useState<Set<number>>(new Set());
  const fileInput = useRef<HTMLInputElement>(null);
  const form = useForm<Input, unknown, Output>({
    resolver: zodResolver(importBody),
    defaultValues: { format: 'edl', text: '', options: { codeFrom: 'clip', pattern: undefined, headHandles: DEFAULT_HANDLES, tailHandles: DEFAULT_HANDLES, startFrame: DEFAULT_FIRST_FRAME }, skipErrors: false },
  });
  const { errors, isSubmitting } = form.formState;
  const codeFrom = form.watch('options.codeFrom');
  const format = form.watch('format');
  const current = JSON.stringify(form.watch());
  const withCodes = (values: Output): Output => (Object.keys(codes).length ? { ...values, options: { ...values.options, codes } } : values);
  // What the preview depends on: the list, the options and the typed codes (not the confirm-only fields).
  const previewKey = (b: Output) => JSON.stringify({ ...b, skipErrors: false, confirmApproved: [] });
  const stale = preview !== null && previewKey(preview.body) !== previewKey(withCodes(JSON.parse(current) as Output));

  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setMessage('');
    if (file.size > MAX_IMPORT_BYTES) {
      setMessage(`${file.name} is larger than ${Math.round(MAX_IMPORT_BYTES / 1000)} KB: an edit list is usually a few KB. Is it the right file?`);
      return;
    }
    const text = await file.text();
    form.setValue('text', text, { shouldValidate: true, shouldDirty: true });
    form.setValue('format', /\.csv$/i.test(file.name) || file.type === 'text/csv' ? 'csv' : 'edl');
  };

  const runPreview = form.handleSubmit(async (values) => {
    setMessage('');
    setDone(null);
    try {
      const body = withCodes(values);
      const answer = await api<{ preview: Preview }>(`/api/studios/${studioId}/shows/${show.id}/import/preview`, { method: 'POST', body: { ...body, skipErrors: false } });
      setPreview({ data: answer.preview, body });
      setSkipErrors(false);
      setTicked(new Set());
    } catch (err) {
      setPreview(null);
      setMessage(applyServerError(err, form.setError, FIELDS));
    }
  }, () => setMessage(''));

  const confirm = async () => {
    if (!preview) return;
    setConfirming(true);
    setMessage('');
    try {
      const answer = await api<{ import: Done }>(`/api/studios/${studioId}/shows/${show.id}/import/confirm`, {
        method: 'POST',
        body: { ...preview.body, skipErrors, confirmApproved: [...ticked] },
      });
      setDone(answer.import);
      setPreview(null);
      setCodes({});
    } catch (err) {
      setMessage(err instanceof ApiError ? err.message : applyServerError(err, form.setError, FIELDS));
    } finally {
      setConfirming(false);
    }
  };

  const p = preview?.data;
  const nothingToDo = p && p.create.length === 0 && p.update.length === 0;

  return (
    <div className="grid gap-6 lg:grid-cols-5">
      <form onSubmit={runPreview} noValidate className="card space-y-4 p-5 sm:p-6 lg:col-span-2" aria-label="Edit list">
        <FormMessage>{message}</FormMessage>
        <fieldset>
          <legend className="field-label">Format</legend>
          <div className="inline-flex rounded-lg border border-sand-line bg-paper p-0.5 text-sm">
            {(['edl', 'csv'] as const).map((f) => (
              <label key={f} className="cursor-pointer rounded-md px-3 py-1 text-ink-soft has-checked:bg-ink has-checked:text-sand">
                <input type="radio" value={f} className="sr-only" {...form.register('format')} />
                {f === 'edl' ? 'EDL (CMX 3600)' : 'CSV'}
              </label>
            ))}
          </div>
        </fieldset>
        <div>
          <div className="flex items-baseline justify-between gap-3">
            <label htmlFor="field-text" className="field-label">
              {format === 'csv' ? 'Shot list' : 'Edit decision list'}
            </label>
            <button type="button" className="link text-sm" onClick={() => fileInput.current?.click()}>
              Open a file…
            </button>
            <input ref={fileInput} type="file" accept=".edl,.csv,text/csv,text/plain" className="sr-only" tabIndex={-1} aria-label="EDL or CSV file" onChange={(e) => void onFile(e.target.files?.[0])} />
          </div>
          <textarea
            id="field-text"
            rows={12}
            spellCheck={false}
            aria-invalid={errors.text ? true : undefined}
            aria-describedby="field-text-hint"
            placeholder={format === 'csv' ? 'code,first,last,handles,description\nHBR_0010,1001,1048,8,Wall hit' : 'TITLE: …\nFCM: NON-DROP FRAME\n001  A001C001 V  C  10:00:00:00 10:00:03:00 01:00:00:00 01:00:03:00\n* FROM CLIP NAME: HBR_0010'}
            className="field-input font-mono text-xs leading-relaxed whitespace-pre"
            {...form.register('text')}
          />
          {errors.text ? (
            <p className="field-error">Edit list {errors.text.message}</p>
          ) : (
            <p id="field-text-hint" className="mt-1.5 text-xs text-ink-muted">
              Paste it, or open a .edl or .csv file. Timecodes are read at the show’s rate, {rateText(show.frameRate)}.
            </p>
          )}
        </div>

        <fieldset className="space-y-3 rounded-lg border border-sand-line p-4">
          <legend className="px-1 text-sm font-semibold">How shots are made</legend>
          {format === 'edl' && (
            <div className="space-y-2 text-sm">
              <label className="flex items-center gap-2">
                <input type="radio" value="clip" className="accent-harbour-600" {...form.register('options.codeFrom')} />
                Code from the clip name (<code className="text-xs">* FROM CLIP NAME:</code>)
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" value="pattern" className="accent-harbour-600" {...form.register('options.codeFrom')} />
                Code from a pattern
              </label>
            </div>
          )}
          {format === 'edl' && codeFrom === 'pattern' && (
            <InputField
              label="Pattern"
              registration={form.register('options.pattern', { setValueAs: (v) => (v === '' ? undefined : v) })}
              error={errors.options?.pattern?.message}
              placeholder={`${show.code}_{n:03}0`}
              hint={
                <>
                  <code>{'{n:03}'}</code> counts shots (001, 002…); also <code>{'{event}'}</code>, <code>{'{reel}'}</code>, <code>{'{clip}'}</code>.
                </>
              }
            />
          )}
          <div className="grid grid-cols-3 gap-3">
            <InputField label="Head handles" type="number" registration={form.register('options.headHandles', { setValueAs: toNumber })} error={errors.options?.headHandles?.message} hint="frames before the cut in" />
            <InputField label="Tail handles" type="number" registration={form.register('options.tailHandles', { setValueAs: toNumber })} error={errors.options?.tailHandles?.message} hint="frames after the cut out" />
            <InputField
              label="First frame number"
              type="number"
              registration={form.register('options.startFrame', { setValueAs: toNumber })}
              error={errors.options?.startFrame?.message}
              hint={convention === 'cut-in' ? 'falls on the cut in (studio setting)' : 'falls on the first head-handle frame (studio setting)'}
            />
          </div>
        </fieldset>
        <div className="flex justify-end gap-2">
          <a className="btn-quiet" href={`/studios/${studioSlug}/shows/${show.id}`}>
            Back to {show.code}
          </a>
          <SubmitButton busy={isSubmitting}>Preview</SubmitButton>
        </div>
      </form>

      <section aria-labelledby="preview-heading" className="lg:col-span-3" data-testid="import-preview">
        <h2 id="preview-heading" className="sr-only">
          Preview
        </h2>
        {done ? (
          <div className="card space-y-4 p-5 sm:p-6" role="status">
            <h3 className="text-lg font-semibold">Imported into {show.code}</h3>
            <p className="text-ink-soft">
              {done.summary.create} created · {done.summary.update} frame ranges changed · {done.summary.unchanged} unchanged
              {done.summary.errors ? ` · ${done.summary.errors} lines skipped` : ''}
              {done.summary.skipped ? ` · ${done.summary.skipped} events made no shot` : ''}.
            </p>
            {done.kept.length > 0 && (
              <p className="text-sm text-amber-800" data-testid="import-kept">
                Approved and not ticked, so their frame ranges were kept: <span className="break-all">{done.kept.map((k) => k.code).join(', ')}</span>.
              </p>
            )}
            <a className="btn-primary" href={`/studios/${studioSlug}/shows/${show.id}`}>
              See the shots
            </a>
          </div>
        ) : !p ? (
          <div className="card grid min-h-60 place-items-center p-6 text-center text-ink-soft">
            <div className="max-w-sm">
              <p className="font-medium text-ink">Nothing is written until you confirm.</p>
              <p className="mt-1 text-sm">
                The preview lists the shots to create, the ones whose frame range changes (re-importing an updated cut never duplicates a shot), and any line it
                could not read, by line number.
              </p>
            </div>
          </div>
        ) : (
          <div className="space-y-4">
            <ul className="flex flex-wrap gap-2 text-sm" aria-label="Summary">
              <SummaryPill tone="bg-foam-50 text-foam-600" n={p.summary.create} word="to create" />
              <SummaryPill tone="bg-amber-50 text-amber-800" n={p.summary.update} word="to change" />
              <SummaryPill tone="bg-sand-deep text-ink-soft" n={p.summary.unchanged} word="unchanged" />
              <SummaryPill tone="bg-coral-50 text-coral-700" n={p.summary.errors} word={p.summary.errors === 1 ? 'line with an error' : 'lines with errors'} />
              {p.summary.skipped > 0 && <SummaryPill tone="bg-sand-deep text-ink-soft" n={p.summary.skipped} word={p.summary.skipped === 1 ? 'event skipped' : 'events skipped'} />}
            </ul>

            {p.summary.approvedChanges > 0 && (
              <p className="rounded-lg border border-amber-200 bg-amber-50 p-3 text-sm text-amber-900" data-testid="import-approved-warning">
                {p.summary.approvedChanges === 1 ? 'One approved shot' : `${p.summary.approvedChanges} approved shots`} would change frame range. Its
                approved work was made for the old range: tick each one you mean to change; unticked ones keep their range.
              </p>
            )}

            {p.errors.length > 0 && (
              <div className="rounded-lg border border-coral-100 bg-coral-50 p-4" data-testid="import-errors">
                <h3 className="text-sm font-semibold text-coral-700">Lines Tidemark could not read</h3>
                <ul className="mt-2 space-y-1 text-sm text-coral-700">
                  {p.errors.map((e, i) => (
                    <li key={i}>
                      <span className="font-mono font-semibold">Line {e.line}:</span> {e.message}
                    </li>
                  ))}
                </ul>
              </div>
            )}

            {p.skipped.length > 0 && (
              <details className="rounded-lg border border-sand-line bg-paper p-4" data-testid="import-skipped" open={p.skipped.length <= 6}>
                <summary className="cursor-pointer text-sm font-semibold">Events that make no shot ({p.skipped.length})</summary>
                <ul className="mt-2 space-y-1 text-sm text-ink-soft">
                  {p.skipped.map((e) => (
                    <li key={e.line} data-line={e.line}>
                      <span className="font-mono font-semibold">Line {e.line}</span>, event {e.event}
                      {e.clipName ? (
                        <>
                          {' '}
                          (<span className="break-all">{e.clipName}</span>)
                        </>
                      ) : null}
                      : skipped, {e.reason}.
                    </li>
                  ))}
                </ul>
              </details>
            )}

            <div className="card overflow-x-auto">
              <table className="w-full min-w-[34rem] text-left text-sm" data-testid="import-table">
                <thead className="border-b border-sand-line text-xs tracking-wide text-ink-muted uppercase">
                  <tr>
                    <th scope="col" className="px-3 py-2.5 pl-5 font-medium">
                      Line
                    </th>
                    <th scope="col" className="px-3 py-2.5 font-medium">
                      Shot
                    </th>
                    <th scope="col" className="px-3 py-2.5 font-medium">
                      What happens
                    </th>
                    <th scope="col" className="px-3 py-2.5 pr-5 font-medium">
                      Cut in – cut out, handles ({rateText(p.frameRate)})
                    </th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-sand-line/70">
                  {[
                    ...p.create.map((s) => ({
                      line: s.line,
                      key: `c${s.line}`,
                      row: (
                        <PlanRow
                          kind="create"
                          shot={s}
                          rate={p.frameRate}
                          note={s.source?.clipName ?? undefined}
                          // EDL codes made from the clip name can be adjusted here (a CSV row names its own code).
                          onCode={preview?.body.format === 'edl' ? (code) => setCodes((c) => ({ ...c, [String(s.line)]: code })) : undefined}
                          codeValue={codes[String(s.line)]}
                        />
                      ),
                    })),
                    ...p.update.map((u) => ({
                      line: u.line,
                      key: `u${u.line}`,
                      row: (
                        <PlanRow
                          kind="update"
                          shot={{ line: u.line, code: u.code, firstFrame: u.to.first, lastFrame: u.to.last, headHandles: u.to.headHandles, tailHandles: u.to.tailHandles, source: u.source }}
                          rate={p.frameRate}
                          from={u.from}
                          approved={
                            u.approved
                              ? {
                                  ticked: ticked.has(u.id),
                                  onTick: (on) =>
                                    setTicked((t) => {
                                      const next = new Set(t);
                                      if (on) next.add(u.id);
                                      else next.delete(u.id);
                                      return next;
                                    }),
                                }
                              : undefined
                          }
                        />
                      ),
                    })),
                    ...p.unchanged.map((s) => ({ line: s.line, key: `n${s.line}`, row: <PlanRow kind="unchanged" shot={s} rate={p.frameRate} /> })),
                  ]
                    .sort((a, b) => a.line - b.line)
                    .map((r) => (
                      <Fragmentish key={r.key}>{r.row}</Fragmentish>
                    ))}
                  {p.create.length + p.update.length + p.unchanged.length === 0 && (
                    <tr>
                      <td colSpan={4} className="px-5 py-8 text-center text-ink-soft">
                        No shot could be read from this list.
                      </td>
                    </tr>
                  )}
                </tbody>
              </table>
            </div>

            <div className="card flex flex-wrap items-center gap-3 p-4">
              {stale ? (
                <p className="flex-1 text-sm text-amber-800">
                  The list, options or codes changed since this preview: preview again before importing.{' '}
                  <button type="button" className="link" onClick={() => void runPreview()}>
                    Preview again
                  </button>
                </p>
              ) : nothingToDo ? (
                <p className="flex-1 text-sm text-ink-soft">Nothing to import: every readable shot already matches.</p>
              ) : p.errors.length > 0 ? (
                <label className="flex flex-1 items-center gap-2 text-sm">
                  <input type="checkbox" className="size-4 accent-harbour-600" checked={skipErrors} onChange={(e) => setSkipErrors(e.target.checked)} />
                  Import the readable lines and skip the {p.errors.length === 1 ? 'line' : `${p.errors.length} lines`} with errors
                </label>
              ) : (
                <p className="flex-1 text-sm text-ink-soft">
                  {p.summary.create} to create, {p.summary.update - p.summary.approvedChanges + ticked.size} to change, in one go
                  {p.summary.approvedChanges > ticked.size ? ` (${p.summary.approvedChanges - ticked.size} approved kept as they are)` : ''}.
                </p>
              )}
              <button type="button" className="btn-primary" disabled={stale || !!nothingToDo || confirming || (p.errors.length > 0 && !skipErrors)} onClick={() => void confirm()}>
                {confirming && <Spinner />}
                Confirm import
              </button>
            </div>
          </div>
        )}
      </section>
    </div>
  );
}

function Fragmentish({ children }: { children: React.ReactNode }) {
  return <>{children}</>;
}

function SummaryPill({ tone, n, word }: { tone: string; n: number; word: string }) {
  return (
    <li className={`rounded-full px-3 py-1 font-medium ${tone} ${n === 0 ? 'opacity-60' : ''}`}>
      <span className="tabular-nums">{n}</span> {word}
    </li>
  );
}

const KIND = {
  create: { label: 'create', mark: '+', tone: 'text-foam-600' },
  update: { label: 'change range', mark: '↻', tone: 'text-amber-800' },
  unchanged: { label: 'unchanged', mark: '=', tone: 'text-ink-muted' },
} as const;

function PlanRow({
  kind,
  shot,
  rate,
  from,
  note,
  onCode,
  codeValue,
  approved,
}: {
  kind: keyof typeof KIND;
  shot: Planned;
  rate: string;
  from?: Range;
  note?: string;
  /** When given, the code is an input the user may adjust (its default came from the clip name). */
  onCode?: (code: string) => void;
  codeValue?: string;
  /** An approved shot's range change: shown with a tick box; unticked, the shot keeps its range. */
  approved?: { ticked: boolean; onTick: (on: boolean) => void };
}) {
  const k = KIND[kind];
  return (
    <tr data-kind={kind} data-approved={approved ? 'true' : undefined} className={kind === 'unchanged' ? 'text-ink-muted' : approved ? 'bg-amber-50/60' : ''}>
      <td className="px-3 py-2 pl-5 align-top font-mono text-xs text-ink-muted">{shot.line}</td>
      <td className="max-w-[16rem] px-3 py-2 align-top">
        {onCode ? (
          <input
            className="field-input w-full py-1 font-mono text-sm font-semibold"
            aria-label={`Code of line ${shot.line}`}
            value={codeValue ?? shot.code}
            maxLength={64}
            spellCheck={false}
            onChange={(e) => onCode(e.target.value)}
          />
        ) : (
          <span className="block truncate font-semibold" title={shot.code}>
            {shot.code}
          </span>
        )}
        {note && (
          <span className="block truncate text-xs text-ink-muted" title={note}>
            from {note}
          </span>
        )}
      </td>
      <td className={`px-3 py-2 align-top ${k.tone}`}>
        <span className="whitespace-nowrap">
          <span aria-hidden="true" className="mr-1.5 inline-block w-3 text-center font-semibold">
            {k.mark}
          </span>
          {k.label}
        </span>
        {approved && (
          <label className="mt-1 flex items-start gap-1.5 text-xs font-medium text-amber-900">
            <input type="checkbox" className="mt-0.5 size-3.5 accent-amber-700" checked={approved.ticked} onChange={(e) => approved.onTick(e.target.checked)} />
            <span>Approved shot: change its range anyway</span>
          </label>
        )}
      </td>
      <td className="px-3 py-2 pr-5 whitespace-nowrap">
        {from && (
          <span className="block text-xs text-ink-muted tabular-nums">
            <span className="line-through decoration-1">
              {from.first}–{from.last} · {handlesText(from.headHandles, from.tailHandles)}
            </span>{' '}
            <span aria-label="becomes">→</span>
          </span>
        )}
        <CutRange shot={{ ...shot, frameRate: rate, sourceTimecodeIn: shot.source?.sourceIn ?? null }} testId={`plan-range-${shot.line}`} />
      </td>
    </tr>
  );
}
