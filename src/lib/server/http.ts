// JSON endpoint helpers: one error shape `{ error: { code, message, fields? } }`, zod parsing, no stack traces out.
import type { APIContext, APIRoute } from 'astro';
import { z, ZodError, type ZodTypeAny } from 'zod';

export type ErrorCode =
  | 'bad_request'
  | 'invalid_json'
  | 'validation_failed'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'gone'
  | 'payload_too_large'
  | 'unprocessable'
  | 'too_many_requests'
  | 'internal';

const statusOf: Record<ErrorCode, number> = {
  bad_request: 400,
  invalid_json: 400,
  validation_failed: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  gone: 410,
  payload_too_large: 413,
  unprocessable: 422,
  too_many_requests: 429,
  internal: 500,
};

/** An error that becomes a JSON answer with its status. `fields` maps a field path to its message. */
export class HttpError extends Error {
  constructor(
    public code: ErrorCode,
    message: string,
    public fields?: Record<string, string>,
    public extra?: Record<string, unknown>,
    public headers?: Record<string, string>,
  ) {
    super(message);
  }
  get status() {
    return statusOf[this.code];
  }
}

export function json(body: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(status === 204 ? null : JSON.stringify(body), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function errorResponse(err: HttpError): Response {
  const body = { error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}), ...(err.extra ?? {}) } };
  return json(body, err.status, err.headers);
}

/** Turns zod issues into `{ "a.b": "message" }` and a sentence naming the fields. */
export function fromZod(error: ZodError): HttpError {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '(body)';
    if (!fields[key]) fields[key] = issue.message;
  }
  const names = Object.keys(fields);
  const message =
    names.length === 1 ? `${names[0]}: ${fields[names[0]]}` : `Please fix these fields: ${names.join(', ')}`;
  return new HttpError('validation_failed', message, fields);
}

const MAX_JSON_BYTES = 1_000_000;
/** Limit of the small public forms (sign-in, password reset, invitation, share password, guest note): 16 KB. */
export const PUBLIC_FORM_BYTES = 16_384;

/**
 * Reads the request body as UTF-8 text, stopping with 413 as soon as more than `maxBytes` arrive — the same for a
 * body with a Content-Length and a chunked one (the stream is cancelled, so the rest is never buffered).
 */
export async function readBodyText(request: Request, maxBytes: number): Promise<string> {
  const tooLarge = () => new HttpError('payload_too_large', `Request body is larger than ${maxBytes} bytes`);
  const length = Number(request.headers.get('content-length') ?? '0');
  if (length > maxBytes) throw tooLarge();
  if (!request.body) return '';
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes) {
      void discardRest(reader);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString('utf8');
}

/** Past this much more, or this long, an oversized body is cut off instead of read and thrown away. */
const DISCARD_BYTES = 64 * 1024 * 1024;
const DISCARD_MS = 15_000;

/**
 * Reads and drops the rest of a refused body while the 413 goes out, so the client gets its answer instead of a reset
 * connection (closing a socket with unread data resets it); nothing is kept. A body that goes on past DISCARD_BYTES
 * or DISCARD_MS is cut off.
 */
async function discardRest(reader: ReadableStreamDefaultReader<Uint8Array>): Promise<void> {
  const until = Date.now() + DISCARD_MS;
  let dropped = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) return;
      dropped += value.byteLength;
      if (dropped > DISCARD_BYTES || Date.now() > until) break;
    }
  } catch {
    return;
  }
  await reader.cancel().catch(() => {});
}

/** Limit of an action that takes no fields (revoke, cancel, complete): an empty body or `{}`, 1 KB at most. */
export const EMPTY_BODY_BYTES = 1024;
/** The body of an action that takes no fields: nothing, or `{}`; any field is refused by name. */
export const emptyBody = z
  .object({}, { invalid_type_error: 'must be an empty JSON object {}' })
  .passthrough()
  .superRefine((body, ctx) => {
    for (const key of Object.keys(body)) ctx.addIssue({ code: z.ZodIssueCode.custom, path: [key], message: 'is not a field of this action (send an empty body or {})' });
  });

/** Reads and checks the body of an action that takes no fields (400 naming an unknown field, 413 past 1 KB). */
export const readEmptyBody = (request: Request) => readJson(request, emptyBody, EMPTY_BODY_BYTES);

/** Reads the request body as JSON and parses it with the schema; throws HttpError on bad input (413 past `maxBytes`). */
export async function readJson<S extends ZodTypeAny>(request: Request, schema: S, maxBytes = MAX_JSON_BYTES): Promise<z.infer<S>> {
  const text = await readBodyText(request, maxBytes);
  let data: unknown;
  try {
    data = text === '' ? {} : JSON.parse(text);
  } catch {
    throw new HttpError('invalid_json', 'Request body is not valid JSON', { '(body)': 'not valid JSON' });
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) throw fromZod(parsed.error);
  return parsed.data;
}

/** Parses URL search parameters with the schema. */
export function readQuery<S extends ZodTypeAny>(url: URL, schema: S): z.infer<S> {
  const parsed = schema.safeParse(Object.fromEntries(url.searchParams));
  if (!parsed.success) throw fromZod(parsed.error);
  return parsed.data;
}

/** Parses a route parameter as a positive integer id. */
export function idParam(params: Record<string, string | undefined>, name: string): number {
  const raw = params[name] ?? '';
  if (!/^[1-9][0-9]{0,15}$/.test(raw)) throw new HttpError('not_found', `No such ${name.replace(/Id$/, '')}`);
  return Number(raw);
}

/** Wraps an endpoint: HttpError → its JSON answer; anything else → a logged 500 without details. */
export function endpoint(fn: (ctx: APIContext) => Promise<Response>): APIRoute {
  return async (ctx) => {
    try {
      return await fn(ctx);
    } catch (err) {
      if (err instanceof HttpError) return errorResponse(err);
      if (err instanceof ZodError) return errorResponse(fromZod(err));
      console.error(`[api] ${ctx.request.method} ${ctx.url.pathname}:`, err);
      return errorResponse(new HttpError('internal', 'Something went wrong on our side. Please try again.'));
    }
  };
}
