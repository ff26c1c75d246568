// The object store: one S3 client factory for the app server and the bake workers (any S3-compatible store).
import {
  S3Client,
  GetObjectCommand,
  PutObjectCommand,
  HeadObjectCommand,
  DeleteObjectCommand,
  CreateMultipartUploadCommand,
  UploadPartCommand,
  CompleteMultipartUploadCommand,
  AbortMultipartUploadCommand,
  CopyObjectCommand,
  ListObjectsV2Command,
} from '@aws-sdk/client-s3';
import { createHash } from 'node:crypto';
import type { Readable } from 'node:stream';
import { Upload } from '@aws-sdk/lib-storage';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import { createPresignedPost } from '@aws-sdk/s3-presigned-post';
import { config } from './config';

let client: S3Client | undefined;

/**
 * Returns the shared S3 client. Checksums only when required: without this, stream uploads to
 * self-hosted stores get aws-chunked framing stored inside the object and presigned requests carry a
 * checksum of an empty body that such stores reject.
 */
export function s3(): S3Client {
  if (!client) {
    const c = config.s3;
    client = new S3Client({
      endpoint: c.endpoint,
      region: c.region,
      forcePathStyle: c.forcePathStyle,
      credentials: { accessKeyId: c.accessKeyId, secretAccessKey: c.secretAccessKey },
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    });
  }
  return client;
}

export const bucket = () => config.s3.bucket;

/** Uploads bytes or a stream (multipart above 8 MiB) and returns the stored size in bytes. */
export async function putObject(key: string, body: Uint8Array | ReadableStream | NodeJS.ReadableStream, contentType: string): Promise<void> {
  const upload = new Upload({
    client: s3(),
    params: { Bucket: bucket(), Key: key, Body: body as never, ContentType: contentType },
    partSize: 8 * 1024 * 1024,
    queueSize: 2,
  });
  await upload.done();
}

/** Reads a whole object (or a byte range, inclusive) into memory. */
export async function getObject(key: string, range?: [number, number]): Promise<Uint8Array> {
  const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key, Range: range ? `bytes=${range[0]}-${range[1]}` : undefined }));
  return new Uint8Array(await res.Body!.transformToByteArray());
}

/** Opens the object as a byte stream (for responses that pass a large object through without holding it whole). */
export async function getObjectStream(key: string): Promise<ReadableStream<Uint8Array>> {
  const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  return res.Body!.transformToWebStream() as ReadableStream<Uint8Array>;
}

/** Returns the object's size and type, or null when it does not exist. */
export async function headObject(key: string): Promise<{ size: number; contentType?: string } | null> {
  try {
    const res = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
    return { size: Number(res.ContentLength ?? 0), contentType: res.ContentType };
  } catch (e: any) {
    if (e?.$metadata?.httpStatusCode === 404 || e?.name === 'NotFound') return null;
    throw e;
  }
}

export async function deleteObject(key: string): Promise<void> {
  await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}

/** Copies an object to another key inside the bucket, on the store's side (one request, objects up to 5 GB). */
export async function copyObject(from: string, to: string): Promise<void> {
  await s3().send(new CopyObjectCommand({ Bucket: bucket(), Key: to, CopySource: `${bucket()}/${from.split('/').map(encodeURIComponent).join('/')}` }));
}

/** Keys under `prefix` last modified before `before`, at most `limit` of them (oldest listing order, not sorted). */
export async function keysOlderThan(prefix: string, before: Date, limit = 1000): Promise<string[]> {
  const out: string[] = [];
  let token: string | undefined;
  do {
    const res = await s3().send(new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: token }));
    for (const o of res.Contents ?? []) if (o.Key && o.LastModified && o.LastModified < before) out.push(o.Key);
    token = res.IsTruncated ? res.NextContinuationToken : undefined;
  } while (token && out.length < limit);
  return out.slice(0, limit);
}

/**
 * Where a browser upload lands before it is checked: `uploads/<studio>/<random>.<ext>`, a prefix the browser may
 * write through a form and nothing reads. Completion copies the object to its final key (never writable by a form)
 * and checks that copy, so a form used again after the check cannot replace what was checked.
 */
export const UPLOADS_PREFIX = 'uploads/';
export const uploadKey = (studioId: number, random: string, ext: string) => `${UPLOADS_PREFIX}${studioId}/${random}.${ext}`;

/** Stores bytes in one request that the signal can abort. */
export async function putBytes(key: string, body: Uint8Array, contentType: string, signal?: AbortSignal): Promise<void> {
  await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType }), { abortSignal: signal });
}

/** Smallest part of a multipart upload other than the last (S3's rule), bytes. */
export const MIN_PART_BYTES = 5 * 1024 * 1024;

/** A multipart upload driven part by part (parts may be sent in any order; numbers run from 1 to 10 000). */
export class MultipartUpload {
  private parts: { PartNumber: number; ETag: string }[] = [];
  private constructor(
    readonly key: string,
    private readonly uploadId: string,
  ) {}

  static async start(key: string, contentType: string, signal?: AbortSignal): Promise<MultipartUpload> {
    const res = await s3().send(new CreateMultipartUploadCommand({ Bucket: bucket(), Key: key, ContentType: contentType }), { abortSignal: signal });
    return new MultipartUpload(key, res.UploadId!);
  }

  async part(partNumber: number, body: Uint8Array, signal?: AbortSignal): Promise<void> {
    const res = await s3().send(
      new UploadPartCommand({ Bucket: bucket(), Key: this.key, UploadId: this.uploadId, PartNumber: partNumber, Body: body }),
      { abortSignal: signal },
    );
    this.parts.push({ PartNumber: partNumber, ETag: res.ETag! });
  }

  async complete(signal?: AbortSignal): Promise<void> {
    const parts = [...this.parts].sort((a, b) => a.PartNumber - b.PartNumber);
    await s3().send(
      new CompleteMultipartUploadCommand({ Bucket: bucket(), Key: this.key, UploadId: this.uploadId, MultipartUpload: { Parts: parts } }),
      { abortSignal: signal },
    );
  }

  /** Discards the parts sent so far (best effort: the store also expires unfinished uploads by its own rules). */
  async abort(): Promise<void> {
    await s3().send(new AbortMultipartUploadCommand({ Bucket: bucket(), Key: this.key, UploadId: this.uploadId })).catch(() => {});
  }
}

/** Reads the stored object as a stream and returns its SHA-256 (hex) and size in bytes. */
export async function objectDigest(key: string, signal?: AbortSignal): Promise<{ sha256: string; size: number }> {
  const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }), { abortSignal: signal });
  const hash = createHash('sha256');
  let size = 0;
  for await (const piece of res.Body as Readable) {
    hash.update(piece as Buffer);
    size += (piece as Buffer).length;
  }
  return { sha256: hash.digest('hex'), size };
}

/** A short-lived URL the browser can GET (with Range requests). */
export function presignGet(key: string, seconds = 900, downloadName?: string): Promise<string> {
  return getSignedUrl(
    s3(),
    new GetObjectCommand({
      Bucket: bucket(),
      Key: key,
      ResponseContentDisposition: downloadName ? `attachment; filename="${downloadName.replace(/"/g, '')}"` : undefined,
    }),
    { expiresIn: seconds },
  );
}

const presigned = new Map<string, { url: string; reuseUntil: number }>();
const PRESIGNED_KEPT = 5000;

/**
 * A GET URL like presignGet's that lives at least `seconds` from now, signed once and handed out again for half its
 * lifetime: each is signed for 1.5 × `seconds` and reused while it has `seconds` or more left. Lists that carry a URL
 * per row (thumbnails) then sign only new rows, and the browser sees the same URL and may keep the image cached.
 */
export async function presignGetShared(key: string, seconds = 900): Promise<string> {
  const id = `${seconds}:${key}`;
  const now = Date.now();
  const hit = presigned.get(id);
  if (hit && hit.reuseUntil > now) return hit.url;
  const url = await presignGet(key, Math.round(seconds * 1.5));
  presigned.delete(id);
  if (presigned.size >= PRESIGNED_KEPT) presigned.delete(presigned.keys().next().value!);
  presigned.set(id, { url, reuseUntil: now + (seconds / 2) * 1000 });
  return url;
}

/**
 * A short-lived form upload (S3 presigned POST) of one object: the policy binds the key, the content type and the
 * size (`content-length-range` 1…maxBytes), so the store itself refuses a larger file, another key or another type
 * (the S3 stand-in enforces the same through src/cli/store-gate.ts). The browser sends `fields` first, then the file
 * as the form's last field named `file`. The only way the browser writes to the store: there is no presigned PUT.
 */
export async function presignPost(key: string, contentType: string, maxBytes: number, seconds = 900): Promise<{ url: string; fields: Record<string, string> }> {
  return createPresignedPost(s3(), {
    Bucket: bucket(),
    Key: key,
    Conditions: [
      ['content-length-range', 1, maxBytes],
      ['eq', '$Content-Type', contentType],
    ],
    Fields: { 'Content-Type': contentType },
    Expires: seconds,
  });
}
