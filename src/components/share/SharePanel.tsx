// The Share panel of a version (supervisors): make a link for people outside the studio — to the version's player or
// to one stored export — with an expiry date and an optional password, e-mail it, see opens, turn links off.
import { useCallback, useEffect, useState } from 'react';
import { api, ApiError, messageOf } from '../shared/api';
import { EXPORT_STORED_EVENT, type StoredExport } from '~/lib/export/store';

export interface SharePanelProps {
  versionId: number;
}

interface LinkView {
  id: number;
  exportAssetId: number | null;
  exportFormat: string | null;
  hasPassword: boolean;
  expiresAt: string;
  revokedAt: string | null;
  openCount: number;
  status: 'active' | 'expired' | 'revoked';
  createdAt: string;
  createdBy: string | null;
}

const day = (iso: string) => new Date(iso).toISOString().slice(0, 10);
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);
const STATUS_LABEL = { active: 'Open', expired: 'Expired', revoked: 'Turned off' } as const;

export default function SharePanel({ versionId }: SharePanelProps) {
  const [links, setLinks] = useState<LinkView[] | null>(null);
  const [exports, setExports] = useState<StoredExport[]>([]);
  const [expiresAt, setExpiresAt] = useState(inDays(14));
  const [password, setPassword] = useState('');
  const [target, setTarget] = useState('version');
  const [email, setEmail] = useState('');
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<{ message: string; fields: Record<string, string> } | null>(null);
  const [created, setCreated] = useState<{ id: number; url: string; token: string; emailedTo: string | null } | null>(null);
  const [copied, setCopied] = useState(false);

  const refresh = useCallback(() => {
    api<{ links: LinkView[] }>(`/api/versions/${versionId}/share-links`)
      .then((r) => setLinks(r.links))
      .catch((e) => setError({ message: messageOf(e), fields: {} }));
    api<{ exports: StoredExport[] }>(`/api/versions/${versionId}/exports`)
      .then((r) => setExports(r.exports.filter((e) => e.format === 'mp4' || e.format === 'gif')))
      .catch(() => setExports([]));
  }, [versionId]);
  useEffect(refresh, [refresh]);
  useEffect(() => {
    window.addEventListener(EXPORT_STORED_EVENT, refresh);
    return () => window.removeEventListener(EXPORT_STORED_EVENT, refresh);
  }, [refresh]);

  async function create(e: { preventDefault(): void }) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    setCopied(false);
    try {
      const res = await api<{ link: LinkView; url: string; token: string; emailedTo: string | null }>(`/api/versions/${versionId}/share-links`, {
        method: 'POST',
        body: {
          expiresAt,
          ...(password ? { password } : {}),
          exportAssetId: target === 'version' ? null : Number(target),
          ...(email ? { email } : {}),
          ...(message ? { message } : {}),
        },
      });
      setCreated({ id: res.link.id, url: res.url, token: res.token, emailedTo: res.emailedTo });
      setPassword('');
      refresh();
    } catch (err) {
      setError({ message: messageOf(err), fields: err instanceof ApiError ? err.fields : {} });
    } finally {
      setBusy(false);
    }
  }

  async function sendAgain() {
    if (!created || !email) return;
    setBusy(true);
    setError(null);
    try {
      await api(`/api/share-links/${created.id}/send`, { method: 'POST', body: { token: created.token, email, ...(message ? { message } : {}) } });
      setCreated({ ...created, emailedTo: email });
    } catch (err) {
      setError({ message: messageOf(err), fields: err instanceof ApiError ? err.fields : {} });
    } finally {
      setBusy(false);
    }
  }

  async function revoke(id: number) {
    try {
      await api(`/api/share-links/${id}/revoke`, { method: 'POST', body: {} });
      refresh();
    } catch (err) {
      setError({ message: messageOf(err), fields: {} });
    }
  }

  return (
    <section className="card p-5" data-testid="share-panel" aria-labelledby="share-panel-title">
      <h2 id="share-panel-title" className="text-lg font-semibold tracking-tight">
        Share with a client
      </h2>
      <p className="mt-1 text-sm text-ink-muted">A link that plays without an account, until the date you choose. Comments left there arrive as client notes.</p>

      <form className="mt-4 grid gap-3 text-sm" onSubmit={create} noValidate>
        <label>
          <span className="field-label">Shows</span>
          <select className="field-input" value={target} onChange={(e) => setTarget(e.target.value)} aria-label="Link shows">
            <option value="version">This version in the player</option>
            {exports.map((x) => (
              <option key={x.id} value={String(x.id)}>
                Export: {x.fileName}
              </option>
            ))}
          </select>
        </label>
        <label>
          <span className="field-label">Works until</span>
          <input className="field-input" type="date" name="expiresAt" value={expiresAt} min={inDays(0)} onChange={(e) => setExpiresAt(e.target.value)} aria-invalid={!!error?.fields.expiresAt || undefined} />
          {error?.fields.expiresAt && <span className="field-error">Date {error.fields.expiresAt}</span>}
        </label>
        <label>
          <span className="field-label">Password (optional)</span>
          <input className="field-input" type="text" name="sharePassword" autoComplete="off" value={password} onChange={(e) => setPassword(e.target.value)} aria-invalid={!!error?.fields.password || undefined} />
          {error?.fields.password && <span className="field-error">Password {error.fields.password}</span>}
        </label>
        <label>
          <span className="field-label">E-mail it to (optional)</span>
          <input className="field-input" type="email" name="clientEmail" value={email} onChange={(e) => setEmail(e.target.value)} aria-invalid={!!error?.fields.email || undefined} />
          {error?.fields.email && <span className="field-error">E-mail {error.fields.email}</span>}
        </label>
        <label>
          <span className="field-label">Message (optional)</span>
          <textarea className="field-input" rows={2} value={message} onChange={(e) => setMessage(e.target.value)} />
        </label>
        <div>
          <button type="submit" className="btn-primary" disabled={busy}>
            Create link
          </button>
        </div>
      </form>
      {error && !Object.keys(error.fields).length && (
        <p className="field-error" role="alert">
          {error.message}
        </p>
      )}

      {created && (
        <div className="mt-4 rounded-lg border border-harbour-300 bg-harbour-50 p-3 text-sm" data-testid="share-created">
          <p className="font-medium">Link made. Copy it now: Tidemark keeps only a fingerprint of it and cannot show it again.</p>
          <div className="mt-2 flex gap-2">
            <input className="field-input" readOnly value={created.url} data-testid="share-url" aria-label="Share link" onFocus={(e) => e.target.select()} />
            <button
              type="button"
              className="btn-quiet"
              onClick={() => void navigator.clipboard?.writeText(created.url).then(() => setCopied(true), () => setCopied(false))}
            >
              {copied ? 'Copied' : 'Copy'}
            </button>
          </div>
          {created.emailedTo ? (
            <p className="mt-2 text-ink-muted">E-mailed to {created.emailedTo}.</p>
          ) : (
            email && (
              <button type="button" className="btn-quiet mt-2" disabled={busy} onClick={() => void sendAgain()}>
                E-mail it to {email}
              </button>
            )
          )}
        </div>
      )}

      <h3 className="mt-6 text-sm font-semibold">Links</h3>
      {links && links.length === 0 && <p className="mt-1 text-sm text-ink-muted">No links yet.</p>}
      {links && links.length > 0 && (
        <ul className="mt-2 divide-y divide-sand-line text-sm" data-testid="share-links">
          {links.map((l) => (
            <li key={l.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                <span className="font-medium">{STATUS_LABEL[l.status]}</span> · {l.exportFormat ? `${l.exportFormat.toUpperCase()} export` : 'player'} · until {day(l.expiresAt)}
                {l.hasPassword ? ' · password' : ''}
                <span className="block text-ink-muted">
                  {l.openCount} open{l.openCount === 1 ? '' : 's'} · made by {l.createdBy ?? 'someone'} on {day(l.createdAt)}
                </span>
              </span>
              {l.status === 'active' && (
                <button type="button" className="btn-ghost-danger" onClick={() => void revoke(l.id)}>
                  Turn off
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
