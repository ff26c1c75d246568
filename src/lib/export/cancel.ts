// The error an export ends with when its user cancels it.
export class CancelledError extends Error {
  override name = 'CancelledError';
  constructor() {
    super('The export was cancelled');
  }
}

export function throwIfAborted(signal: AbortSignal) {
  if (signal.aborted) throw new CancelledError();
}

/** Lets the page breathe between frames (input, paint), and stops when cancelled. */
export async function yieldToPage(signal: AbortSignal) {
  await new Promise((r) => setTimeout(r, 0));
  throwIfAborted(signal);
}
