// Save as version: validates the scene with the shared schema (messages per field), posts it as a new version of the
// shot with a comment, then offers to bake it and links to the version page.
import { useState } from 'react';
import { parseScene, type SceneError } from '~/lib/scene/schema';
import type { EditorDoc } from '~/lib/editor/document';
import { api, ApiError, messageOf } from '~/components/shared/api';
import { Spinner } from '~/components/shared/form';
import { errorInWords } from '~/lib/editor/save-errors';
import { versionLabel } from '~/lib/vocab';

interface Saved { id: number; number: number; sceneHash: string }

export function SavePanel({ doc, shotId, studioSlug, onSaved, onClose }: { doc: EditorDoc; shotId: number; studioSlug: string; onSaved(v: Saved): void; onClose(): void }) {
  const [comment, setComment] = useState('');
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<SceneError[]>([]);
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<Saved | null>(null);
  const [bake, setBake] = useState<string | null>(null);

  const save = async () => {
    setMessage(null);
    const parsed = parseScene(doc);
    if (!parsed.ok) { setErrors(parsed.errors); return; }
    setErrors([]);
    setBusy(true);
    try {
      const res = await api<{ version: Saved }>(`/api/shots/${shotId}/versions`, { method: 'POST', body: { scene: parsed.scene, comment: comment.trim() || undefined } });
      setSaved(res.version);
      onSaved(res.version);
    } catch (err) {
      if (err instanceof ApiError && Object.keys(err.fields).length) {
        setErrors(Object.entries(err.fields).map(([path, m]) => ({ path: path.replace(/^scene\./, ''), message: m })));
      }
      setMessage(messageOf(err));
    } finally {
      setBusy(false);
    }
  };

  const startBake = async () => {
    if (!saved) return;
    setBusy(true);
    try {
      const r = await api<{ state: string }>(`/api/versions/${saved.id}/bake`, { method: 'POST', body: {} });
      setBake(r.state === 'queued' ? 'Queued for baking.' : r.state === 'baked' || r.state === 'reused' ? 'Already baked: ready to play.' : 'Baking now.');
    } catch (err) {
      setBake(messageOf(err));
    } finally {
      setBusy(false);
    }
  };

  return (
    <div role="dialog" aria-modal="true" aria-labelledby="save-title" className="fixed inset-0 z-40 grid place-items-center bg-ink/40 p-4" onKeyDown={(e) => e.key === 'Escape' && onClose()}>
      <div className="card w-full max-w-md p-5">
        <h2 id="save-title" className="text-lg font-semibold">{saved ? `Saved as ${versionLabel(saved.number)}` : 'Save as a new version'}</h2>
        {!saved ? (
          <>
            <p className="mt-1 text-sm text-ink-soft">Each save is a new numbered version; earlier versions never change.</p>
            <label htmlFor="version-comment" className="field-label mt-4">Comment</label>
            <textarea id="version-comment" rows={3} maxLength={2000} value={comment} onChange={(e) => setComment(e.target.value)} className="field-input" placeholder="What changed, for the supervisor" autoFocus />
            {errors.length > 0 && (
              <div role="alert" className="mt-3 rounded-lg border border-coral-100 bg-coral-50 px-3 py-2 text-sm text-coral-700">
                <p className="font-medium">The scene needs fixing before it can be saved:</p>
                <ul className="mt-1 list-disc pl-5">{errors.slice(0, 8).map((e) => { const w = errorInWords(e); return <li key={e.path + e.message}><strong className="font-semibold">{w.where}</strong>: {w.what}</li>; })}</ul>
              </div>
            )}
            {message && errors.length === 0 && <p role="alert" className="mt-3 text-sm text-coral-700">{message}</p>}
            <div className="mt-5 flex justify-end gap-2">
              <button type="button" className="btn-quiet" onClick={onClose}>Cancel</button>
              <button type="button" className="btn-primary" disabled={busy} onClick={save}>{busy && <Spinner />}Save version</button>
            </div>
          </>
        ) : (
          <>
            <p className="mt-1 text-sm text-ink-soft">Earlier versions stay as they were. Bake this one to review the full-resolution splash.</p>
            {bake && <p role="status" className="mt-3 rounded-lg bg-foam-50 px-3 py-2 text-sm text-foam-600" data-testid="bake-status">{bake}</p>}
            <div className="mt-5 flex flex-wrap justify-end gap-2">
              <a className="btn-quiet" href={`/studios/${studioSlug}/versions/${saved.id}`}>Open {versionLabel(saved.number)}</a>
              <button type="button" className="btn-quiet" onClick={onClose}>Keep blocking</button>
              <button type="button" className="btn-primary" disabled={busy || bake !== null} onClick={startBake}>{busy && <Spinner />}Bake this version</button>
            </div>
          </>
        )}
      </div>
    </div>
  );
}
