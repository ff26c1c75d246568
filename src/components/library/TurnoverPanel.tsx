// Turnover to editorial on a show's page (supervisors and owners): which approval to take, what the ZIP will hold
// (the EDL, one MP4 per approved shot) and which approved shots cannot go in yet and why; then the download.
import { useEffect, useState } from 'react';
import { api, messageOf } from '../shared/api';
import { TURNOVER_APPROVALS, TURNOVER_APPROVAL_WORDS, type TurnoverApproval, type TurnoverPlan } from '~/lib/library/turnover';

interface Props {
  studioId: number;
  showId: number;
  initial: TurnoverPlan;
}

const mb = (bytes: number) => (bytes < 1024 * 1024 ? `${Math.max(1, Math.round(bytes / 1024))} kB` : `${(bytes / (1024 * 1024)).toFixed(1)} MB`);

export default function TurnoverPanel({ studioId, showId, initial }: Props) {
  const [approval, setApproval] = useState<TurnoverApproval>(initial.approval);
  const [plan, setPlan] = useState<TurnoverPlan>(initial);
  const [error, setError] = useState<string | null>(null);
  const base = `/api/studios/${studioId}/shows/${showId}/turnover?approval=${approval}`;

  useEffect(() => {
    if (approval === plan.approval) return;
    api<{ turnover: TurnoverPlan }>(base)
      .then((r) => setPlan(r.turnover))
      .catch((e) => setError(messageOf(e)));
  }, [approval]);

  const total = plan.items.reduce((n, i) => n + i.byteSize, 0);
  return (
    <section className="mt-8 rounded-lg border border-sand-line bg-white/60 p-5" data-testid="turnover">
      <h2 className="text-lg font-semibold">Turnover to editorial</h2>
      <p className="mt-1 max-w-2xl text-sm text-ink-soft">
        A ZIP for the editor who sent the cut: an edit list (CMX 3600) with one event per shot at its original record timecode, and the MP4 export of
        each shot's approved version. The edit list's clip names are the MP4 file names, so the editor can relink them.
      </p>
      <label className="mt-4 block text-sm font-medium">
        Versions to include
        <select className="ml-3 rounded border border-sand-line px-2 py-1" value={approval} onChange={(e) => setApproval(e.target.value as TurnoverApproval)}>
          {TURNOVER_APPROVALS.map((a) => (
            <option key={a} value={a}>
              {TURNOVER_APPROVAL_WORDS[a]}
            </option>
          ))}
        </select>
      </label>
      {error && <p className="mt-3 text-sm text-coral-700">{error}</p>}
      <div className="mt-4 text-sm" data-testid="turnover-contents">
        <p className="font-medium">
          The ZIP contains {plan.items.length ? `${plan.items.length + 2} files (${mb(total)} of MP4)` : 'nothing yet'}:
        </p>
        {plan.items.length > 0 && (
          <ul className="mt-1 list-inside list-disc text-ink-soft">
            <li>
              <code>{plan.edlFileName}</code> — edit list, {plan.items.length} event{plan.items.length === 1 ? '' : 's'}
            </li>
            {plan.items.map((i) => (
              <li key={i.shotId}>
                <code>{i.fileName}</code> — {i.code} {i.version}, record {i.recordIn}–{i.recordOut}
              </li>
            ))}
            <li>
              <code>contents.txt</code> — this list, with the shots left out
            </li>
          </ul>
        )}
      </div>
      {plan.missing.length > 0 && (
        <div className="mt-4 text-sm" data-testid="turnover-missing">
          <p className="font-medium text-coral-700">Approved but not in the ZIP ({plan.missing.length}):</p>
          <ul className="mt-1 list-inside list-disc text-ink-soft">
            {plan.missing.map((m) => (
              <li key={m.shotId}>
                {m.code} {m.version}: {m.reason}
              </li>
            ))}
          </ul>
        </div>
      )}
      {plan.notApproved > 0 && (
        <p className="mt-3 text-sm text-ink-muted">
          {plan.notApproved} shot{plan.notApproved === 1 ? ' has' : 's have'} no version that passes this filter.
        </p>
      )}
      <div className="mt-4">
        {plan.items.length > 0 ? (
          <a className="btn-primary" href={`${base}&format=zip`} download={plan.zipFileName}>
            Download {plan.zipFileName}
          </a>
        ) : (
          <button type="button" className="btn-primary" disabled>
            Nothing to turn over yet
          </button>
        )}
      </div>
    </section>
  );
}
