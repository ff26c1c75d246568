// Create or edit a shot: code, description, cut in and cut out (a new shot's cut in follows the studio's handle
// convention) with their source timecode, head and tail handles, rate, plate resolution and pixel aspect, assignee,
// due date, status. Validated with the shared shotCreate schema.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { shotCreate } from '~/lib/library/schemas';
import { cutInFrame, DEFAULT_FIRST_FRAME, DEFAULT_HANDLES, rangeWithHandles } from '~/lib/library/handles';
import { SHOT_STATUSES, type HandleConvention } from '~/lib/vocab';
import { FRAME_RATES, rateText, framesToTimecode, sourceTimecodeLabel } from '~/lib/timecode';
import { api } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton } from '../shared/form';
import { blankToNull, InputField, SelectField, TextAreaField, toNumber } from './fields';
import { rangeLength } from './format';
import type { Person, ShotDetail, ShotRow } from './types';

type Input = z.input<typeof shotCreate>;
type Output = z.output<typeof shotCreate>;
const FIELDS = ['code', 'description', 'firstFrame', 'lastFrame', 'headHandles', 'tailHandles', 'frameRate', 'plateWidth', 'plateHeight', 'pixelAspect', 'assigneeId', 'dueDate', 'status', 'sourceTimecodeIn', 'plateFirstFrame'] as const;

interface Props {
  studioId: number;
  showId: number;
  /** The show's rate: the default for a new shot. */
  showRate: string;
  shot?: ShotRow;
  /** The studio's handle convention: places a new shot's cut in (1001 + head handles, or 1001). */
  convention?: HandleConvention;
  people: Person[];
  onSaved: (shot: ShotDetail) => void;
  onCancel: () => void;
}

export default function ShotForm({ studioId, showId, showRate, shot, convention = 'head-handle', people, onSaved, onCancel }: Props) {
  const [message, setMessage] = useState('');
  const form = useForm<Input, unknown, Output>({
    resolver: zodResolver(shotCreate),
    defaultValues: {
      showId,
      code: shot?.code ?? '',
      description: shot?.description ?? null,
      firstFrame: shot?.firstFrame ?? cutInFrame(convention, DEFAULT_HANDLES),
      lastFrame: shot?.lastFrame ?? (undefined as unknown as number),
      headHandles: shot?.headHandles ?? DEFAULT_HANDLES,
      tailHandles: shot?.tailHandles ?? DEFAULT_HANDLES,
      frameRate: (shot?.frameRate ?? showRate) as Output['frameRate'],
      plateWidth: shot?.plateWidth ?? 1920,
      plateHeight: shot?.plateHeight ?? 1080,
      pixelAspect: shot?.pixelAspect ?? 1,
      assigneeId: shot?.assigneeId ?? null,
      dueDate: shot?.dueDate ? shot.dueDate.slice(0, 10) : null,
      status: shot?.status ?? 'blocking',
      // 00:00:00:00 at the show's rate (00:00:00;00 when it counts drop frame) for a new shot.
      sourceTimecodeIn: shot?.sourceTimecodeIn ?? framesToTimecode(0, shot?.frameRate ?? showRate),
      plateFirstFrame: shot?.plateFirstFrame ?? null,
    },
  });
  const { errors, isSubmitting } = form.formState;
  const [first, last, rate, sourceIn, head, tail] = form.watch(['firstFrame', 'lastFrame', 'frameRate', 'sourceTimecodeIn', 'headHandles', 'tailHandles']);
  const validRange = Number.isInteger(first) && Number.isInteger(last) && (last as number) >= (first as number);
  // Hints show the source timecode of the frame (from the source timecode at the cut in), never the frame number as timecode.
  const tc = (f: unknown) =>
    Number.isInteger(f) && Number.isInteger(first) ? sourceTimecodeLabel({ firstFrame: first as number, frameRate: String(rate), sourceTimecodeIn: sourceIn ?? null }, f as number) : '';

  const submit = form.handleSubmit(async (values) => {
    setMessage('');
    try {
      const { showId: _show, ...patch } = values;
      const answer = shot
        ? await api<{ shot: ShotDetail }>(`/api/studios/${studioId}/shots/${shot.id}`, { method: 'PATCH', body: patch })
        : await api<{ shot: ShotDetail }>(`/api/studios/${studioId}/shots`, { method: 'POST', body: values });
      onSaved(answer.shot);
    } catch (err) {
      setMessage(applyServerError(err, form.setError, FIELDS));
    }
  }, () => setMessage(''));

  const num = { setValueAs: toNumber };
  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label={shot ? 'Edit shot' : 'New shot'}>
      <FormMessage>{message}</FormMessage>
      <div className="grid gap-4 sm:grid-cols-3">
        <InputField label="Code" registration={form.register('code')} error={errors.code?.message} hint="e.g. HBR_0040" autoFocus />
        <SelectField label="Status" registration={form.register('status')} error={errors.status?.message}>
          {SHOT_STATUSES.map((s) => (
            <option key={s} value={s}>
              {s}
            </option>
          ))}
        </SelectField>
        <SelectField label="Assignee" registration={form.register('assigneeId', { setValueAs: blankToNull })} error={errors.assigneeId?.message}>
          <option value="">Unassigned</option>
          {people.map((p) => (
            <option key={p.userId} value={p.userId}>
              {p.name}
            </option>
          ))}
        </SelectField>
      </div>
      <TextAreaField label="Description" rows={2} registration={form.register('description', { setValueAs: blankToNull })} error={errors.description?.message} />

      <fieldset className="rounded-lg border border-sand-line p-4">
        <legend className="px-1 text-sm font-semibold">Cut and handles</legend>
        <div className="grid gap-4 sm:grid-cols-3">
          <InputField label="Cut in" type="number" inputMode="numeric" registration={form.register('firstFrame', num)} error={errors.firstFrame?.message} hint={tc(first) && `source ${tc(first)}`} />
          <InputField label="Cut out" type="number" inputMode="numeric" registration={form.register('lastFrame', num)} error={errors.lastFrame?.message} hint={tc(last) && `source ${tc(last)}`} />
          <InputField
            label="Source timecode at cut in"
            registration={form.register('sourceTimecodeIn', { setValueAs: blankToNull })}
            error={errors.sourceTimecodeIn?.message}
            hint="the plate's own timecode, e.g. 01:00:10:00"
          />
          <InputField label="Head handles" type="number" inputMode="numeric" registration={form.register('headHandles', num)} error={errors.headHandles?.message} hint="frames before the cut in" />
          <InputField label="Tail handles" type="number" inputMode="numeric" registration={form.register('tailHandles', num)} error={errors.tailHandles?.message} hint="frames after the cut out" />
          <SelectField label="Frame rate" registration={form.register('frameRate')} error={errors.frameRate?.message}>
            {FRAME_RATES.map((r) => (
              <option key={r} value={r}>
                {rateText(r)}
              </option>
            ))}
          </SelectField>
        </div>
        <p className="mt-3 text-xs text-ink-muted" aria-live="polite">
          {validRange
            ? `${rangeLength(first as number, last as number)} frames in the cut${handleSpan(first as number, last as number, head, tail)}. Source timecode shown at ${rateText(String(rate))}.`
            : convention === 'cut-in'
              ? `A new shot's cut in is ${DEFAULT_FIRST_FRAME} (studio setting: the first frame number is the cut in).`
              : `A new shot's cut in is ${DEFAULT_FIRST_FRAME} + head handles (studio setting: the first frame number is the first head-handle frame).`}
        </p>
      </fieldset>

      <fieldset className="rounded-lg border border-sand-line p-4">
        <legend className="px-1 text-sm font-semibold">Plate</legend>
        <div className="grid gap-4 sm:grid-cols-4">
          <InputField
            label="Plate's first frame"
            type="number"
            inputMode="numeric"
            registration={form.register('plateFirstFrame', { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : toNumber(v)) })}
            error={errors.plateFirstFrame?.message}
            hint="blank: the plate starts at the cut in; with handles, e.g. cut in − head handles"
          />
          <InputField label="Width" type="number" inputMode="numeric" registration={form.register('plateWidth', num)} error={errors.plateWidth?.message} hint="pixels" />
          <InputField label="Height" type="number" inputMode="numeric" registration={form.register('plateHeight', num)} error={errors.plateHeight?.message} hint="pixels" />
          <InputField label="Pixel aspect" type="number" step="0.01" inputMode="decimal" registration={form.register('pixelAspect', num)} error={errors.pixelAspect?.message} hint="1 for square" />
          <InputField label="Due date" type="date" registration={form.register('dueDate', { setValueAs: blankToNull })} error={errors.dueDate?.message} />
        </div>
      </fieldset>

      <div className="flex justify-end gap-2 pt-1">
        <button type="button" className="btn-quiet" onClick={onCancel}>
          Cancel
        </button>
        <SubmitButton busy={isSubmitting}>{shot ? 'Save shot' : 'Create shot'}</SubmitButton>
      </div>
    </form>
  );
}

/** ", frames 1001–1064 with handles" when both handle counts are whole numbers. */
function handleSpan(first: number, last: number, head: unknown, tail: unknown): string {
  if (!Number.isInteger(head) || !Number.isInteger(tail)) return '';
  const { first: from, last: to } = rangeWithHandles({ firstFrame: first, lastFrame: last, headHandles: head as number, tailHandles: tail as number });
  return `, frames ${from}–${to} with handles`;
}
