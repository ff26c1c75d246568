// The studio's handle convention (owners change it; others read it): where the first frame number falls.
import { useState } from 'react';
import { api, messageOf } from '../shared/api';
import { HANDLE_CONVENTIONS, HANDLE_CONVENTION_WORDS, type HandleConvention } from '~/lib/vocab';

interface Props {
  studioId: number;
  canEdit: boolean;
  initial: HandleConvention;
}

export default function HandleConventionSetting({ studioId, canEdit, initial }: Props) {
  const [value, setValue] = useState<HandleConvention>(initial);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const save = async (next: HandleConvention) => {
    const before = value;
    setValue(next);
    try {
      await api(`/api/studios/${studioId}/settings`, { method: 'PATCH', body: { handleConvention: next } });
      setMessage({ tone: 'success', text: 'Saved. Imports and new shots follow it; existing shots keep their frame numbers.' });
    } catch (e) {
      setValue(before);
      setMessage({ tone: 'error', text: messageOf(e) });
    }
  };
  return (
    <fieldset className="card px-6 py-6" data-testid="handle-convention">
      <legend className="sr-only">Handle convention</legend>
      <h2 className="text-lg font-semibold">Handle convention</h2>
      <p className="mt-1 max-w-2xl text-sm text-ink-soft">
        Where a shot's first frame number (1001 by default) falls. With 8 head handles, the first choice puts the cut in at 1009; the
        second puts it at 1001, with handles 993–1000.
      </p>
      <div className="mt-4 space-y-2">
        {HANDLE_CONVENTIONS.map((c) => (
          <label key={c} className="flex items-center gap-2 text-sm">
            <input type="radio" name="handleConvention" value={c} checked={value === c} disabled={!canEdit} onChange={() => save(c)} className="accent-harbour-600" />
            {HANDLE_CONVENTION_WORDS[c]}
            {c === 'head-handle' && <span className="text-ink-muted">(common practice)</span>}
          </label>
        ))}
      </div>
      {!canEdit && <p className="mt-3 text-sm text-ink-muted">Only the studio owner can change this.</p>}
      {message && <p className={`mt-3 text-sm ${message.tone === 'error' ? 'text-coral-700' : 'text-harbour-700'}`}>{message.text}</p>}
    </fieldset>
  );
}
