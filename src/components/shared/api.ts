// Browser-side calls to Tidemark's JSON API: one fetch wrapper that turns `{ error: { code, message, fields } }` into ApiError.

/** An API answer with an error status; `fields` maps a field name to its message. */
export class ApiError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

const OFFLINE = 'Could not reach Tidemark. Check your connection and try again.';

/** Calls the API and returns the parsed JSON body (undefined for 204); throws ApiError on any error status. */
export async function api<T = unknown>(path: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  let response: Response;
  try {
    response = await fetch(path, {
      method: init.method ?? 'GET',
      headers: { accept: 'application/json', ...(init.body !== undefined ? { 'content-type': 'application/json' } : {}) },
      body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
      credentials: 'same-origin',
    });
  } catch {
    throw new ApiError(0, 'offline', OFFLINE);
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let data: unknown = undefined;
  try {
    data = text ? JSON.parse(text) : undefined;
  } catch {
    // Not JSON (a proxy page, say): fall through to the generic message below.
  }
  if (!response.ok) {
    const error = (data as { error?: { code?: string; message?: string; fields?: Record<string, string> } } | undefined)?.error;
    throw new ApiError(
      response.status,
      error?.code ?? 'http_' + response.status,
      error?.message ?? `Something went wrong (${response.status}). Please try again.`,
      error?.fields ?? {},
    );
  }
  return data as T;
}

/** The text to show for any thrown value. */
export function messageOf(err: unknown): string {
  if (err instanceof Error && err.message) return err.message;
  return 'Something went wrong. Please try again.';
}
