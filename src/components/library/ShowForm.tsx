// Create or edit a show: code, name, description, frame rate. Validated with the shared showCreate schema.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { showCreate, SHOW_CODE_MAX } from '~/lib/library/schemas';
import { FRAME_RATES, rateText } from '~/lib/timecode';
import { api } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton } from '../shared/form';
import { blankToNull, InputField, SelectField, TextAreaField } from './fields';
import type { ShowDetail, ShowRow } from './types';

type Input = z.input<typeof showCreate>;
type Output = z.output<typeof showCreate>;
const FIELDS = ['code', 'name', 'description', 'frameRate'] as const;

export default function ShowForm({ studioId, show, onSaved, onCancel }: { studioId: number; show?: ShowRow; onSaved: (show: ShowDetail) => void; onCancel: () => void }) {
  const [message, setMessage] = useState('');
  const form = useForm<Input, unknown, Output>({
    resolver: zodResolver(showCreate),
    defaultValues: { code: show?.code ?? '', name: show?.name ?? '', description: show?.description ?? '', frameRate: (show?.frameRate as Output['frameRate']) ?? '24' },
  });
  const { errors, isSubmitting } = form.formState;

  const submit = form.handleSubmit(async (values) => {
    setMessage('');
    try {
      const answer = await api<{ show: ShowDetail }>(show ? `/api/studios/${studioId}/shows/${show.id}` : `/api/studios/${studioId}/shows`, {
        method: show ? 'PATCH' : 'POST',
        body: values,
      });
      onSaved(answer.show);
    } catch (err) {
      setMessage(applyServerError(err, form.setError, FIELDS));
    }
  }, () => setMessage(''));

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label={show ? 'Edit show' : 'New show'}>
      <FormMessage>{message}</FormMessage>
      <div className="grid gap-4 sm:grid-cols-3">
        <InputField label="Code" registration={form.register('code')} error={errors.code?.message} hint={`Short: up to ${SHOW_CODE_MAX} characters, e.g. HBR`} autoFocus />
        <InputField label="Name" className="sm:col-span-2" registration={form.register('name')} error={errors.name?.message} />
      </div>
      <SelectField
        label="Frame rate"
        registration={form.register('frameRate')}
        error={errors.frameRate?.message}
        hint="New shots and imported edits use this rate."
      >
        {FRAME_RATES.map((r) => (
          <option key={r} value={r}>
            {rateText(r)}
          </option>
        ))}
      </SelectField>
      <TextAreaField label="Description" registration={form.register('description', { setValueAs: blankToNull })} error={errors.description?.message} />
      <div className="flex justify-end gap-2 pt-1">
        <button type="button" className="btn-quiet" onClick={onCancel}>
          Cancel
        </button>
        <SubmitButton busy={isSubmitting}>{show ? 'Save show' : 'Create show'}</SubmitButton>
      </div>
    </form>
  );
}
