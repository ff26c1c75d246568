// A shot's thumbnail (PNG, 320 px wide, from its plate) at table or header size, or a quiet stand-in when the shot
// has none yet. The URL is short-lived: when it has expired the stand-in shows until the next refetch brings a new one.
import { useEffect, useState } from 'react';

interface Props {
  url: string | null;
  code: string;
  size?: 'row' | 'header';
}

const SIZES = {
  row: 'h-9 w-16',
  header: 'h-[4.5rem] w-32',
} as const;

export function ShotThumbnail({ url, code, size = 'row' }: Props) {
  const [failed, setFailed] = useState(false);
  useEffect(() => setFailed(false), [url]);
  const box = `${SIZES[size]} shrink-0 overflow-hidden rounded-md border border-sand-line`;
  if (!url || failed) {
    return (
      <span
        className={`${box} grid place-items-center bg-sand/70 text-ink-muted`}
        data-testid="shot-thumbnail-none"
        title={`${code} has no plate thumbnail yet`}
      >
        <svg width="18" height="14" viewBox="0 0 18 14" aria-hidden="true">
          <rect x="1" y="1" width="16" height="12" rx="1.5" fill="none" stroke="currentColor" strokeWidth="1.2" />
          <path d="M2.5 11 7 6.5l3 3 2-2 3.5 3.5" fill="none" stroke="currentColor" strokeWidth="1.2" strokeLinejoin="round" />
        </svg>
        <span className="sr-only">No thumbnail</span>
      </span>
    );
  }
  return (
    <img
      src={url}
      alt={`Plate thumbnail of ${code}`}
      className={`${box} block bg-ink object-contain`}
      loading="lazy"
      decoding="async"
      draggable={false}
      data-testid="shot-thumbnail"
      onError={() => setFailed(true)}
    />
  );
}
