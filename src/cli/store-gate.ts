// The S3 stand-in's front door. s3rver stores a form upload (POST Object) without reading its policy or signature,
// so this gate checks a form POST the way S3 does (signature, expiry, every condition, content-length-range) before
// s3rver sees it, and passes every other request through unchanged. startS3 puts it in front, so npm start and
// npm test talk to the same store. Rules: AWS S3 API Reference, "POST Policy" (sigv4-HTTPPOSTConstructPolicy) and
// "Calculating a Signature" for browser-based uploads (sigv4-UsingHTTPPOST).
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { createReadStream, createWriteStream, mkdirSync, statSync, unlink } from 'node:fs';
import { Agent, createServer, request, type IncomingMessage, type ServerResponse } from 'node:http';
import { createRequire } from 'node:module';
import { once } from 'node:events';
import path from 'node:path';
import type { Readable, Writable } from 'node:stream';

/** The largest object one POST may create when the policy names no range: 5 GB (S3's limit for a single upload). */
const MAX_POST_BYTES = 5 * 1024 ** 3;
/** After a refusal the rest of the body is read and dropped (so the client sees the answer), up to this much. */
const DRAIN_LIMIT_BYTES = 64 * 1024 * 1024;

export type PolicyVerdict =
  | { ok: true; minBytes: number; maxBytes: number }
  | { ok: false; status: number; code: string; message: string };

const refused = (status: number, code: string, message: string): PolicyVerdict => ({ ok: false, status, code, message });

/** Fields S3 never asks a condition for (sigv4-HTTPPOSTConstructPolicy, "Conditions"). */
const exempt = (name: string) => name === 'policy' || name === 'x-amz-signature' || name === 'file' || name.startsWith('x-ignore-');

/** SigV4 signing key: HMAC chain over date, region, service and "aws4_request". */
function signingKey(secret: string, date: string, region: string, service: string): Buffer {
  const h = (key: string | Buffer, data: string) => createHmac('sha256', key).update(data).digest();
  return h(h(h(h(`AWS4${secret}`, date), region), service), 'aws4_request');
}

/**
 * Checks a form upload's fields (names lower-cased) against its signed policy as S3 does, except the file's size,
 * which is only known once it has arrived: that range is returned for the caller to enforce.
 */
export function checkPostPolicy(fields: Map<string, string>, bucket: string, secrets: Record<string, string>, now = new Date()): PolicyVerdict {
  const policy = fields.get('policy');
  if (!policy) return refused(403, 'AccessDenied', 'Bucket POST must carry a signed policy (this bucket is not publicly writable)');
  if (fields.get('x-amz-algorithm') !== 'AWS4-HMAC-SHA256') return refused(400, 'InvalidArgument', 'x-amz-algorithm must be AWS4-HMAC-SHA256');
  const [accessKey, date, region, service, terminal] = (fields.get('x-amz-credential') ?? '').split('/');
  const secret = secrets[accessKey ?? ''];
  if (!secret) return refused(403, 'InvalidAccessKeyId', 'The AWS access key id you provided does not exist in our records');
  if (!date || !region || service !== 's3' || terminal !== 'aws4_request') return refused(400, 'InvalidArgument', 'x-amz-credential is malformed');
  const expected = createHmac('sha256', signingKey(secret, date, region, service)).update(policy).digest();
  const given = Buffer.from(fields.get('x-amz-signature') ?? '', 'hex');
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) {
    return refused(403, 'SignatureDoesNotMatch', 'The request signature we calculated does not match the signature you provided');
  }

  let doc: { expiration?: unknown; conditions?: unknown };
  try {
    doc = JSON.parse(Buffer.from(policy, 'base64').toString('utf8'));
  } catch {
    return refused(400, 'InvalidPolicyDocument', 'Invalid Policy: Invalid JSON');
  }
  const expires = typeof doc.expiration === 'string' ? Date.parse(doc.expiration) : NaN;
  if (Number.isNaN(expires) || !Array.isArray(doc.conditions)) return refused(400, 'InvalidPolicyDocument', 'Invalid Policy: expiration and conditions are required');
  if (now.getTime() > expires) return refused(403, 'AccessDenied', 'Invalid according to Policy: Policy expired.');

  const value = (name: string) => (name === 'bucket' ? bucket : fields.get(name));
  const failed = (c: unknown) => refused(403, 'AccessDenied', `Invalid according to Policy: Policy Condition failed: ${JSON.stringify(c)}`);
  const covered = new Set<string>();
  let minBytes = 0;
  let maxBytes = MAX_POST_BYTES;
  for (const c of doc.conditions as unknown[]) {
    if (Array.isArray(c)) {
      const [op, a, b] = c;
      if (op === 'content-length-range' && Number.isInteger(a) && Number.isInteger(b)) {
        minBytes = Math.max(minBytes, a);
        maxBytes = Math.min(maxBytes, b);
        continue;
      }
      if ((op !== 'eq' && op !== 'starts-with') || typeof a !== 'string' || !a.startsWith('$') || typeof b !== 'string') {
        return refused(400, 'InvalidPolicyDocument', `Invalid Policy: Invalid condition ${JSON.stringify(c)}`);
      }
      const name = a.slice(1).toLowerCase();
      covered.add(name);
      const v = value(name);
      if (v === undefined || (op === 'eq' ? v !== b : !v.startsWith(b))) return failed(c);
    } else if (c && typeof c === 'object') {
      for (const [k, want] of Object.entries(c)) {
        const name = k.toLowerCase();
        covered.add(name);
        if (value(name) !== want) return failed(c);
      }
    } else {
      return refused(400, 'InvalidPolicyDocument', `Invalid Policy: Invalid condition ${JSON.stringify(c)}`);
    }
  }
  const extra = [...fields.keys()].filter((name) => !exempt(name) && !covered.has(name));
  if (extra.length) return refused(403, 'AccessDenied', `Invalid according to Policy: Extra input fields: ${extra.join(', ')}`);
  return { ok: true, minBytes, maxBytes };
}

const xmlEscape = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

interface BusboyLike extends Writable {
  on(ev: 'field', fn: (name: string, value: string, nameTruncated: boolean, valueTruncated: boolean) => void): this;
  on(ev: 'file', fn: (name: string, file: Readable) => void): this;
  on(ev: string, fn: (...args: any[]) => void): this;
}
// busboy 0.3 (the multipart parser s3rver itself reads forms with), loaded the CommonJS way.
const Busboy = createRequire(import.meta.url)('busboy') as new (o: { headers: IncomingMessage['headers']; limits?: { fieldSize?: number } }) => BusboyLike;

export interface StoreGateOptions {
  /** Port the gate listens on (127.0.0.1); 0 for any free one. */
  port: number;
  /** The store behind it, e.g. http://127.0.0.1:41234. */
  target: string;
  bucket: string;
  /** Access key id → secret the store accepts (to check a policy's signature). */
  secrets: Record<string, string>;
  /** Origins the bucket's CORS rules allow: a refusal carries the CORS header too, so a browser can read it. */
  allowedOrigins: string[];
  /** Where a form upload waits while it is checked (deleted after it is passed on). */
  spoolDir: string;
}

/** Starts the gate; resolves to its URL and a stop() that closes it. */
export async function startStoreGate(o: StoreGateOptions): Promise<{ url: string; spoolDir: string; stop: () => Promise<void> }> {
  mkdirSync(o.spoolDir, { recursive: true });
  const agent = new Agent({ keepAlive: true });
  const formPath = new RegExp(`^/${o.bucket.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}/?(\\?.*)?$`);

  const passOn = (req: IncomingMessage, res: ServerResponse, body: Readable, headers = req.headers) => {
    const up = request(o.target + req.url, { method: req.method, headers, agent }, (upRes) => {
      res.writeHead(upRes.statusCode ?? 502, upRes.headers);
      upRes.pipe(res);
    });
    up.on('error', () => res.destroy());
    res.on('close', () => up.destroy());
    body.pipe(up);
  };

  const answerError = (req: IncomingMessage, res: ServerResponse, v: Extract<PolicyVerdict, { ok: false }>, extra = '') => {
    if (res.headersSent) return;
    const origin = req.headers.origin;
    res.writeHead(v.status, {
      'content-type': 'application/xml',
      ...(origin && o.allowedOrigins.includes(origin) ? { 'access-control-allow-origin': origin, vary: 'Origin' } : {}),
    });
    res.end(`<?xml version="1.0" encoding="UTF-8"?>\n<Error><Code>${v.code}</Code><Message>${xmlEscape(v.message)}</Message>${extra}</Error>`);
  };

  /** A form upload: spooled while busboy reads its fields; the policy is checked when the file starts, its size as it streams. */
  const handleForm = (req: IncomingMessage, res: ServerResponse) => {
    const spoolPath = path.join(o.spoolDir, `post-${randomBytes(8).toString('hex')}`);
    const spool = createWriteStream(spoolPath);
    const cleanup = () => unlink(spoolPath, () => undefined);
    let busboy: BusboyLike;
    try {
      busboy = new Busboy({ headers: req.headers });
    } catch {
      spool.destroy();
      cleanup();
      return answerError(req, res, { ok: false, status: 400, code: 'MalformedPOSTRequest', message: 'The body of your POST request is not well-formed multipart/form-data.' });
    }
    const fields = new Map<string, string>();
    let verdict: PolicyVerdict | null = null;
    let refusal: { v: Extract<PolicyVerdict, { ok: false }>; extra: string } | null = null;
    let fileSeen = false;
    let fileBytes = 0;

    const refuse = (v: Extract<PolicyVerdict, { ok: false }>, extra = '') => {
      if (refusal) return;
      refusal = { v, extra };
      req.unpipe(spool);
      req.unpipe(busboy);
      spool.destroy();
      cleanup();
      // Read and drop the rest so the client gets the answer rather than a reset; a body past the limit is cut off.
      let drained = 0;
      req.on('data', (piece: Buffer) => {
        drained += piece.length;
        if (drained > DRAIN_LIMIT_BYTES) req.destroy();
      });
      req.resume();
      if (req.readableEnded) answerError(req, res, v, extra);
      else req.once('end', () => answerError(req, res, v, extra));
    };
    const checkSize = () => {
      if (verdict?.ok && fileBytes > verdict.maxBytes) {
        refuse(
          { ok: false, status: 400, code: 'EntityTooLarge', message: 'Your proposed upload exceeds the maximum allowed size' },
          `<ProposedSize>${fileBytes}</ProposedSize><MaxSizeAllowed>${verdict.maxBytes}</MaxSizeAllowed>`,
        );
      }
    };
    const fileStarts = () => {
      fileSeen = true;
      verdict = checkPostPolicy(fields, o.bucket, o.secrets);
      if (!verdict.ok) refuse(verdict);
    };

    busboy.on('field', (name, value, _nameTruncated, valueTruncated) => {
      if (refusal || fileSeen) return; // S3 ignores fields after the file
      const lower = name.toLowerCase();
      if (lower !== 'file') {
        if (!fields.has(lower)) fields.set(lower, value);
        return;
      }
      // A file part without a file name reaches busboy as a plain field (its value cut at busboy's 1 MB field limit).
      fileStarts();
      fileBytes = Buffer.byteLength(value) + (valueTruncated ? 1 : 0);
      checkSize();
    });
    busboy.on('file', (name, file) => {
      if (refusal || fileSeen || name.toLowerCase() !== 'file') return void file.resume();
      fileStarts();
      file.on('data', (piece: Buffer) => {
        fileBytes += piece.length;
        checkSize();
      });
      file.resume();
    });
    busboy.on('error', () => refuse({ ok: false, status: 400, code: 'MalformedPOSTRequest', message: 'The body of your POST request is not well-formed multipart/form-data.' }));

    Promise.all([once(busboy, 'finish'), once(spool, 'finish')])
      .then(() => {
        if (refusal) return;
        if (fileSeen && verdict?.ok && fileBytes < verdict.minBytes) {
          return refuse(
            { ok: false, status: 400, code: 'EntityTooSmall', message: 'Your proposed upload is smaller than the minimum allowed size' },
            `<ProposedSize>${fileBytes}</ProposedSize><MinSizeAllowed>${verdict.minBytes}</MinSizeAllowed>`,
          );
        }
        // Passed (or no file at all, which s3rver refuses itself): the same bytes go on to the store.
        const { 'transfer-encoding': _chunked, ...headers } = req.headers;
        const body = createReadStream(spoolPath);
        body.on('close', cleanup);
        passOn(req, res, body, { ...headers, 'content-length': String(statSync(spoolPath).size) });
      })
      .catch(() => {
        cleanup();
        if (!refusal) res.destroy();
      });
    req.pipe(spool);
    req.pipe(busboy);
  };

  const server = createServer((req, res) => {
    const isForm = req.method === 'POST' && formPath.test(req.url ?? '') && !/[?&]uploads?(=|&|$)/.test(req.url ?? '') && /^multipart\/form-data/i.test(req.headers['content-type'] ?? '');
    if (isForm) handleForm(req, res);
    else passOn(req, res, req);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(o.port, '127.0.0.1', () => resolve());
  });
  const url = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  return {
    url,
    spoolDir: o.spoolDir,
    stop: () => {
      server.closeAllConnections();
      agent.destroy();
      return new Promise<void>((r) => server.close(() => r()));
    },
  };
}
