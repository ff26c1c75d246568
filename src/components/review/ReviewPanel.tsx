// The review side panel of a version: its review state with the actions the viewer may take (submit, approve, send
// back, share with clients), the client's sign-off (asked for by a supervisor, decided by the client), the notes pinned to frames (threads, replies, resolve), the composer for a note at the
// player's current frame, and the still-open notes of earlier versions. Mounted by the version page beside the player.
import { useEffect, useMemo, useRef, useState, type FormEvent } from 'react';
import { QueryClient, QueryClientProvider, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError, messageOf } from '../shared/api';
import { FormMessage, Spinner } from '../shared/form';
import { markersOf, threadsOf, type NoteMarker, type NotePoint } from '~/lib/review/notes';
import type { Role } from '~/lib/vocab';
import { STATE_TONE, STATE_WORDS, type NotesAnswer, type NoteView, type ReviewAnswer } from './types';
import { versionLabel, type ClientState } from '~/lib/vocab';
import { frameWithTimecode, sourceTimecodeLabel, type SourceTimecodeShot } from '~/lib/timecode';
import { ClientDecisionForm, ClientDecisionLine, ClientSignOffHeading, type DecisionInput } from './ClientSignOff';

/** A mark drawn on the image for the next note: a point or a rough stroke, in plate-normalised 0..1 coordinates. */
export type NoteMark = { point: NotePoint; stroke?: undefined } | { stroke: NotePoint[]; point?: undefined };

export interface ReviewPanelProps {
  versionId: number;
  studioSlug: string;
  /** The viewer's role in the studio (decides which controls show; the server decides again). */
  role: Role;
  /** The player's current frame: new notes are pinned to it, and notes on it are highlighted. */
  currentFrame: number;
  /** Asks the player to jump to a frame (a note's frame was clicked). */
  onSeek: (frame: number) => void;
  /** The version's frames, to tell which carried notes can be jumped to. */
  frameRange?: { start: number; end: number };
  /** A mark drawn on the image (e.g. with NoteOverlay) to attach to the next note, and how to clear it. */
  mark?: NoteMark | null;
  onMarkChange?: (mark: NoteMark | null) => void;
  /** Receives the timeline markers whenever the notes change (one per thread). */
  onMarkers?: (markers: NoteMarker[]) => void;
  /** Told when the review state changes (for the page header). */
  onStateChange?: (state: string) => void;
  /** Told when the client's sign-off state changes (for the page header). */
  onClientStateChange?: (state: ClientState) => void;
  /** The shot's cut in, rate and source timecode at the cut in: a note's frame is shown with its source timecode. */
  tcShot?: SourceTimecodeShot;
  /** The version's bake state as the page follows it: when a bake finishes here, submitting becomes possible. */
  bakeState?: string;
}

/** A note's frame as shown: its number with its source timecode when the shot is known. */
const noteFrame = (p: Pick<ReviewPanelProps, 'tcShot'>, frame: number) => (p.tcShot ? frameWithTimecode(p.tcShot, frame) : String(frame));

export default function ReviewPanel(props: ReviewPanelProps) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: { queries: { staleTime: 10_000, retry: (n, err) => !(err instanceof ApiError && err.status < 500) && n < 2 } },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <Panel {...props} />
    </QueryClientProvider>
  );
}

const staff = (role: Role) => role !== 'client';
const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });

function Panel(p: ReviewPanelProps) {
  const qc = useQueryClient();
  const reviewKey = ['review', p.versionId];
  const notesKey = ['notes', p.versionId];
  const review = useQuery({ queryKey: reviewKey, queryFn: () => api<ReviewAnswer>(`/api/versions/${p.versionId}/review`) });
  const notes = useQuery({ queryKey: notesKey, queryFn: () => api<NotesAnswer>(`/api/versions/${p.versionId}/notes?carried=1`) });
  const refresh = () => {
    void qc.invalidateQueries({ queryKey: reviewKey });
    void qc.invalidateQueries({ queryKey: notesKey });
  };

  // a bake that finishes while the page is open changes what may be done (submit needs a baked version)
  const seenBake = useRef(p.bakeState);
  useEffect(() => {
    if (seenBake.current === p.bakeState) return;
    seenBake.current = p.bakeState;
    void qc.invalidateQueries({ queryKey: ['review', p.versionId] });
  }, [p.bakeState, p.versionId, qc]);

  const markers = useMemo(() => markersOf(notes.data?.notes ?? []), [notes.data]);
  const { onMarkers, onStateChange, onClientStateChange } = p;
  useEffect(() => onMarkers?.(markers), [markers, onMarkers]);
  const state = review.data?.version.reviewState;
  useEffect(() => {
    if (state) onStateChange?.(state);
  }, [state, onStateChange]);
  const clientState = review.data?.version.clientState;
  useEffect(() => {
    if (clientState) onClientStateChange?.(clientState);
  }, [clientState, onClientStateChange]);

  const failure = review.error ?? notes.error;
  if (failure instanceof ApiError && failure.status === 401) {
    window.location.assign(`/sign-in?next=${encodeURIComponent(window.location.pathname + window.location.search)}`);
    return null;
  }

  return (
    <aside className="space-y-5" aria-label="Review" data-testid="review-panel">
      {failure && <FormMessage>{messageOf(failure)}</FormMessage>}
      {review.data ? <ReviewStatus {...p} answer={review.data} onChanged={refresh} /> : !failure && <LoadingCard label="Loading the review…" />}
      {review.data && <ClientSignOffCard {...p} answer={review.data} onChanged={refresh} />}
      <NoteComposer {...p} onCreated={refresh} />
      {notes.data ? <NoteList {...p} notes={notes.data.notes} onChanged={refresh} /> : !failure && <LoadingCard label="Loading notes…" />}
      {notes.data?.carried && notes.data.carried.length > 0 && <CarriedNotes {...p} notes={notes.data.carried} />}
    </aside>
  );
}

function LoadingCard({ label }: { label: string }) {
  return (
    <div className="card flex items-center gap-2 p-4 text-sm text-ink-muted">
      <Spinner /> {label}
    </div>
  );
}

// ── Review state and actions ─────────────────────────────────────────────────────────────────────────────────────

function ReviewStatus(p: ReviewPanelProps & { answer: ReviewAnswer; onChanged: () => void }) {
  const { version, actions, events, canShare } = p.answer;
  const [comment, setComment] = useState('');
  // set when the server refused a submit because the bake's verdict has findings: the artist may give a reason
  const [needsReason, setNeedsReason] = useState(false);
  const [reason, setReason] = useState('');
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const act = useMutation({
    mutationFn: (a: { kind: 'submit' } | { kind: 'decide'; decision: 'approved' | 'returned' } | { kind: 'share'; shared: boolean }) =>
      a.kind === 'submit'
        ? api(`/api/versions/${p.versionId}/review/submit`, {
            method: 'POST',
            body: { ...(comment.trim() ? { comment: comment.trim() } : {}), ...(needsReason && reason.trim() ? { overrideReason: reason.trim() } : {}) },
          })
        : a.kind === 'decide'
          ? api(`/api/versions/${p.versionId}/review/decide`, { method: 'POST', body: { decision: a.decision, ...(comment.trim() ? { comment: comment.trim() } : {}) } })
          : api(`/api/versions/${p.versionId}/share`, { method: 'POST', body: { shared: a.shared } }),
    onSuccess: (_data, a) => {
      setComment('');
      setNeedsReason(false);
      setReason('');
      setMessage({
        tone: 'success',
        text:
          a.kind === 'submit'
            ? 'Submitted. The supervisors have been told by e-mail.'
            : a.kind === 'decide'
              ? a.decision === 'approved'
                ? 'Approved. The artist has been told.'
                : 'Sent back with your notes. The artist has been told.'
              : a.shared
                ? 'Clients of the studio can now see this version.'
                : 'Clients no longer see this version.',
      });
      p.onChanged();
    },
    onError: (err) => {
      if (err instanceof ApiError && err.fields.overrideReason) {
        setNeedsReason(true);
        setMessage({ tone: 'error', text: 'This bake went wrong (its findings are shown above the player). Bake again, or say below why it should be reviewed as it is.' });
        return;
      }
      // A 409 means someone else acted first: the refreshed panel shows what they decided.
      const conflict = err instanceof ApiError && err.status === 409;
      setMessage({ tone: 'error', text: messageOf(err) + (conflict ? ' The panel now shows the current state.' : '') });
      p.onChanged();
    },
  });
  // A second click before React re-renders the disabled button would send a second request: a ref holds the one in flight.
  const inFlight = useRef(false);
  const run = (a: Parameters<typeof act.mutate>[0]) => {
    if (inFlight.current) return;
    inFlight.current = true;
    act.mutate(a, { onSettled: () => (inFlight.current = false) });
  };
  const busy = act.isPending;
  const canSubmit = actions.includes('submit');
  const canDecide = actions.includes('approve') || actions.includes('return');
  const last = events[events.length - 1];

  return (
    <section className="card p-4" data-testid="review-status">
      <div className="flex items-center justify-between gap-3">
        <h2 className="text-sm font-semibold tracking-wide text-ink-soft uppercase">Review</h2>
        <span className={`rounded-full px-2.5 py-0.5 text-xs font-medium ${STATE_TONE[version.reviewState]}`} data-testid="review-panel-state" data-state={version.reviewState}>
          {STATE_WORDS[version.reviewState] ?? version.reviewState}
        </span>
      </div>
      {last && (
        <p className="mt-2 text-sm text-ink-soft">
          {STATE_WORDS[last.toState]} · {last.actor.name} · {when(last.createdAt)}
          {last.comment && <span className="mt-1 block text-ink">“{last.comment}”</span>}
        </p>
      )}
      {version.reviewState === 'draft' && staff(p.role) && version.bakeState !== 'baked' && (
        <p className="mt-2 text-sm text-ink-muted">Bake this version to submit it for review.</p>
      )}
      {(canSubmit || canDecide) && (
        <form className="mt-3 space-y-2" onSubmit={(e) => e.preventDefault()}>
          <label htmlFor={`review-comment-${p.versionId}`} className="field-label">
            {canSubmit ? 'A word for the reviewers (optional)' : 'Comment (needed to send it back)'}
          </label>
          <textarea
            id={`review-comment-${p.versionId}`}
            className="field-input min-h-20"
            value={comment}
            maxLength={5000}
            onChange={(e) => setComment(e.target.value)}
            placeholder={canSubmit ? 'What changed since the last version' : 'What should change, or a word of thanks'}
          />
          {canSubmit && needsReason && (
            <>
              <label htmlFor={`review-reason-${p.versionId}`} className="field-label">Why submit this bake as it is</label>
              <textarea
                id={`review-reason-${p.versionId}`}
                data-testid="override-reason"
                className="field-input min-h-16"
                value={reason}
                maxLength={500}
                onChange={(e) => setReason(e.target.value)}
                placeholder="For example: the lost liquid is the spray we want; the supervisor knows"
              />
            </>
          )}
          <div className="flex flex-wrap gap-2">
            {canSubmit && (
              <button type="button" className="btn-primary" disabled={busy || (needsReason && reason.trim().length < 3)} onClick={() => run({ kind: 'submit' })}>
                {busy && <Spinner />}{needsReason ? 'Submit anyway' : 'Submit for review'}
              </button>
            )}
            {actions.includes('approve') && (
              <button type="button" className="btn-primary" disabled={busy} onClick={() => run({ kind: 'decide', decision: 'approved' })}>
                {busy && <Spinner />}Approve
              </button>
            )}
            {actions.includes('return') && (
              <button
                type="button"
                className="btn-danger"
                disabled={busy}
                onClick={() => {
                  if (!comment.trim()) return setMessage({ tone: 'error', text: 'Say what should change before sending the version back.' });
                  run({ kind: 'decide', decision: 'returned' });
                }}
              >
                {busy && <Spinner />}Send back for changes
              </button>
            )}
          </div>
        </form>
      )}
      {canShare && version.reviewState !== 'draft' && (
        <label className="mt-3 flex items-center gap-2 text-sm">
          <input type="checkbox" checked={version.sharedWithClient} disabled={busy} onChange={(e) => act.mutate({ kind: 'share', shared: e.target.checked })} />
          Show this version to the studio’s clients
        </label>
      )}
      {message && (
        <div className="mt-3">
          <FormMessage tone={message.tone}>{message.text}</FormMessage>
        </div>
      )}
    </section>
  );
}

// ── The client's sign-off ────────────────────────────────────────────────────────────────────────────────────────

function ClientSignOffCard(p: ReviewPanelProps & { answer: ReviewAnswer; onChanged: () => void }) {
  const { version, clientSteps } = p.answer;
  const [message, setMessage] = useState('');
  const [note, setNote] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const ask = useMutation({
    mutationFn: () => api(`/api/versions/${p.versionId}/client-review`, { method: 'POST', body: message.trim() ? { message: message.trim() } : {} }),
    onSuccess: () => {
      setMessage('');
      setNote({ tone: 'success', text: 'Sent. The show’s clients see this version and have been asked by e-mail; a share link opens it for sign-off too.' });
      p.onChanged();
    },
    onError: (err) => {
      setNote({ tone: 'error', text: messageOf(err) });
      p.onChanged();
    },
  });
  const decide = async (input: DecisionInput) => {
    try {
      await api(`/api/versions/${p.versionId}/client-review/decide`, { method: 'POST', body: { decision: input.decision, ...(input.comment ? { comment: input.comment } : {}) } });
      setNote({ tone: 'success', text: input.decision === 'sign-off' ? 'Thank you: you signed off this version. The studio has been told.' : 'Sent: the studio has your request for changes.' });
      p.onChanged();
      return null;
    } catch (err) {
      p.onChanged();
      return { message: messageOf(err), fields: err instanceof ApiError ? err.fields : {} };
    }
  };
  // once signed off, asking again is possible through the API but not offered: the decision stands
  const canAsk = clientSteps.includes('send') && version.clientState !== 'signed off';
  const canDecide = clientSteps.includes('sign-off');
  return (
    <section className="card p-4" data-testid="client-sign-off-card">
      <ClientSignOffHeading title="Client sign-off" state={version.clientState} testId="review-panel-client-state" titleClass="text-sm font-semibold tracking-wide text-ink-soft uppercase" />
      <ClientDecisionLine side={version} />
      {staff(p.role) && version.reviewState !== 'approved' && version.clientState === 'not sent' && (
        <p className="mt-2 text-sm text-ink-muted">Once the version is approved by us, a supervisor can ask the client to sign it off.</p>
      )}
      {!staff(p.role) && version.clientState === 'not sent' && <p className="mt-2 text-sm text-ink-muted">The studio has not asked for your sign-off on this version yet.</p>}
      {canAsk && (
        <form className="mt-3 space-y-2" onSubmit={(e) => e.preventDefault()}>
          <label htmlFor={`client-message-${p.versionId}`} className="field-label">
            A word for the client (optional)
          </label>
          <textarea id={`client-message-${p.versionId}`} className="field-input min-h-16" value={message} maxLength={2000} onChange={(e) => setMessage(e.target.value)} />
          <button type="button" className="btn-primary" disabled={ask.isPending} onClick={() => ask.mutate()} data-testid="ask-client">
            {ask.isPending && <Spinner />}
            {version.clientState === 'not sent' ? 'Ask the client to sign off' : 'Ask the client again'}
          </button>
        </form>
      )}
      {canDecide && <ClientDecisionForm idPrefix={`version-${p.versionId}`} askName={false} onDecide={decide} />}
      {note && (
        <div className="mt-3">
          <FormMessage tone={note.tone}>{note.text}</FormMessage>
        </div>
      )}
    </section>
  );
}

// ── Composer ─────────────────────────────────────────────────────────────────────────────────────────────────────

function NoteComposer(p: ReviewPanelProps & { onCreated: () => void }) {
  const [body, setBody] = useState('');
  const [internal, setInternal] = useState(true);
  const [error, setError] = useState<string | null>(null);
  const create = useMutation({
    mutationFn: () =>
      api(`/api/versions/${p.versionId}/notes`, {
        method: 'POST',
        body: {
          frame: p.currentFrame,
          body: body.trim(),
          ...(staff(p.role) ? { internal } : {}),
          ...(p.mark?.point ? { point: p.mark.point } : {}),
          ...(p.mark?.stroke ? { stroke: p.mark.stroke } : {}),
        },
      }),
    onSuccess: () => {
      setBody('');
      setError(null);
      p.onMarkChange?.(null);
      p.onCreated();
    },
    onError: (err) => setError(messageOf(err)),
  });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!body.trim()) return setError('Write the note first.');
    create.mutate();
  };
  return (
    <section className="card p-4" data-testid="note-composer">
      <form onSubmit={submit} className="space-y-2">
        <label htmlFor={`note-body-${p.versionId}`} className="field-label">
          Note on frame <span className="tabular-nums" data-testid="composer-frame">{p.currentFrame}</span>
          {p.tcShot && <span className="tabular-nums text-ink-muted"> · {sourceTimecodeLabel(p.tcShot, p.currentFrame)}</span>}
        </label>
        <textarea
          id={`note-body-${p.versionId}`}
          className="field-input min-h-20"
          value={body}
          maxLength={5000}
          onChange={(e) => setBody(e.target.value)}
          placeholder="What do you see on this frame?"
          aria-invalid={error ? true : undefined}
        />
        {p.mark && (
          <p className="flex items-center gap-2 text-xs text-ink-soft" data-testid="composer-mark">
            {p.mark.point ? `Pinned to a point on the image` : `With a stroke of ${p.mark.stroke.length} points`}
            <button type="button" className="link" onClick={() => p.onMarkChange?.(null)}>
              remove
            </button>
          </p>
        )}
        <div className="flex flex-wrap items-center justify-between gap-2">
          {staff(p.role) ? (
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={internal} onChange={(e) => setInternal(e.target.checked)} />
              Studio only (clients never see it)
            </label>
          ) : (
            <span className="text-xs text-ink-muted">The studio sees your note.</span>
          )}
          <button type="submit" className="btn-primary" disabled={create.isPending}>
            {create.isPending && <Spinner />}Add note
          </button>
        </div>
        {error && <p className="field-error">{error}</p>}
      </form>
    </section>
  );
}

// ── Notes ────────────────────────────────────────────────────────────────────────────────────────────────────────

function NoteList(p: ReviewPanelProps & { notes: NoteView[]; onChanged: () => void }) {
  const threads = threadsOf(p.notes);
  const open = threads.filter((t) => !t.note.resolvedAt).length;
  return (
    <section className="card p-4" data-testid="note-list">
      <h2 className="text-sm font-semibold tracking-wide text-ink-soft uppercase">
        Notes <span className="font-normal normal-case">({open} open of {threads.length})</span>
      </h2>
      {threads.length === 0 ? (
        <p className="mt-2 text-sm text-ink-muted">No notes on this version yet.</p>
      ) : (
        <ol className="mt-3 space-y-3">
          {threads.map((t) => (
            <Thread key={t.note.id} {...p} note={t.note} replies={t.replies} />
          ))}
        </ol>
      )}
    </section>
  );
}

function Thread(p: ReviewPanelProps & { note: NoteView; replies: NoteView[]; onChanged: () => void }) {
  const [replying, setReplying] = useState(false);
  const [reply, setReply] = useState('');
  const [error, setError] = useState<string | null>(null);
  const resolve = useMutation({
    mutationFn: (resolved: boolean) => api(`/api/notes/${p.note.id}`, { method: 'PATCH', body: { resolved } }),
    onSuccess: p.onChanged,
    onError: (err) => setError(messageOf(err)),
  });
  const answer = useMutation({
    mutationFn: () => api(`/api/versions/${p.versionId}/notes`, { method: 'POST', body: { parentId: p.note.id, body: reply.trim() } }),
    onSuccess: () => {
      setReply('');
      setReplying(false);
      p.onChanged();
    },
    onError: (err) => setError(messageOf(err)),
  });
  const here = p.note.frame === p.currentFrame;
  const resolved = p.note.resolvedAt !== null;
  return (
    <li
      className={`rounded-lg border p-3 text-sm ${here ? 'border-harbour-300 bg-harbour-50/60' : 'border-sand-line'} ${resolved ? 'opacity-70' : ''}`}
      data-testid="note-thread"
      data-frame={p.note.frame}
      data-note-id={p.note.id}
    >
      <div className="flex items-start justify-between gap-2">
        <button type="button" className="rounded-md bg-ink px-2 py-0.5 font-mono text-xs text-white tabular-nums hover:bg-harbour-700" onClick={() => p.onSeek(p.note.frame)} aria-label={`Go to frame ${noteFrame(p, p.note.frame)}`}>
          {noteFrame(p, p.note.frame)}
        </button>
        <span className="flex flex-wrap justify-end gap-1 text-xs">
          {p.note.internal && <span className="rounded-full bg-sand-deep px-2 py-0.5 text-ink-soft">studio only</span>}
          {(p.note.point || p.note.stroke) && <span className="rounded-full bg-harbour-50 px-2 py-0.5 text-harbour-700">{p.note.point ? 'point' : 'stroke'}</span>}
          {resolved && <span className="rounded-full bg-foam-50 px-2 py-0.5 text-foam-600">done</span>}
        </span>
      </div>
      <p className="mt-2 whitespace-pre-wrap">{p.note.body}</p>
      <p className="mt-1 text-xs text-ink-muted">
        {p.note.author.name} · {when(p.note.createdAt)}
      </p>
      {p.replies.length > 0 && (
        <ol className="mt-2 space-y-2 border-l-2 border-sand-line pl-3">
          {p.replies.map((r) => (
            <li key={r.id} data-testid="note-reply">
              <p className="whitespace-pre-wrap">{r.body}</p>
              <p className="text-xs text-ink-muted">
                {r.author.name} · {when(r.createdAt)}
                {r.internal && !p.note.internal ? ' · studio only' : ''}
              </p>
            </li>
          ))}
        </ol>
      )}
      <div className="mt-2 flex flex-wrap gap-3 text-xs">
        <button type="button" className="link" onClick={() => setReplying((v) => !v)}>
          Reply
        </button>
        {staff(p.role) && (
          <button type="button" className="link" disabled={resolve.isPending} onClick={() => resolve.mutate(!resolved)}>
            {resolved ? 'Reopen' : 'Mark done'}
          </button>
        )}
      </div>
      {replying && (
        <form
          className="mt-2 flex gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (reply.trim()) answer.mutate();
          }}
        >
          <input className="field-input" value={reply} onChange={(e) => setReply(e.target.value)} placeholder="Your reply" aria-label="Reply" maxLength={5000} />
          <button type="submit" className="btn-quiet" disabled={answer.isPending}>
            Send
          </button>
        </form>
      )}
      {error && <p className="field-error">{error}</p>}
    </li>
  );
}

function CarriedNotes(p: ReviewPanelProps & { notes: NoteView[] }) {
  const threads = threadsOf(p.notes);
  const inRange = (f: number) => !p.frameRange || (f >= p.frameRange.start && f <= p.frameRange.end);
  return (
    <section className="card p-4" data-testid="carried-notes">
      <h2 className="text-sm font-semibold tracking-wide text-ink-soft uppercase">Still open from earlier versions</h2>
      <ol className="mt-3 space-y-3">
        {threads.map(({ note, replies }) => (
          <li key={note.id} className="rounded-lg border border-sand-line p-3 text-sm" data-testid="carried-note">
            <p className="text-xs text-ink-muted">
              {note.versionNumber !== undefined ? versionLabel(note.versionNumber) : ''} ·{' '}
              {inRange(note.frame) ? (
                <button type="button" className="link" onClick={() => p.onSeek(note.frame)}>
                  frame {noteFrame(p, note.frame)}
                </button>
              ) : (
                <>frame {noteFrame(p, note.frame)}</>
              )}{' '}
              · {note.author.name}
            </p>
            <p className="mt-1 whitespace-pre-wrap">{note.body}</p>
            {replies.length > 0 && <p className="mt-1 text-xs text-ink-muted">{replies.length === 1 ? '1 reply' : `${replies.length} replies`}</p>}
          </li>
        ))}
      </ol>
    </section>
  );
}
