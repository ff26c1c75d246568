// Display helpers for the library: frame ranges with SMPTE timecode beside them, rates, dates and sizes.

/** Frames in an inclusive range. */
export function rangeLength(first: number, last: number): number {
  return last - first + 1;
}

/** A due date (YYYY-MM-DD) as "31 Mar 2025"; '' for none. */
export function dueLabel(date: string | null): string {
  if (!date) return '';
  const d = new Date(`${date.slice(0, 10)}T00:00:00Z`);
  return d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

/** True when a due date is before today (local). */
export function isOverdue(date: string | null): boolean {
  if (!date) return false;
  const today = new Date();
  const iso = `${today.getFullYear()}-${String(today.getMonth() + 1).padStart(2, '0')}-${String(today.getDate()).padStart(2, '0')}`;
  return date.slice(0, 10) < iso;
}

/** A byte count as "12.4 MB". */
export function bytesLabel(bytes: number | null | undefined): string {
  if (bytes == null) return '';
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/** Metres per pixel with enough digits to be useful ("0.00421 m/px"). */
export function metresLabel(metres: number): string {
  if (metres >= 100) return `${metres.toFixed(0)} m`;
  if (metres >= 1) return `${metres.toFixed(2)} m`;
  return `${metres.toPrecision(3)} m`;
}
