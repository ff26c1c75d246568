// Streams a clip to the object store while it bakes. The head (magic, header, index) is known only at the end, so
// it goes into part 1, sent last together with the first chunks (at least 5 MiB, S3's smallest part but the last);
// later chunks go out as parts 2, 3, … of about 8 MiB as each fills. In memory: part 1's chunks, the filling part
// and the parts on the wire, never the whole clip. A clip under 5 MiB is one PUT at the end.
// The SHA-256 of the stored object is computed from the bytes sent, never by reading the object back. The head that
// starts the object is known last, so the parts sent before it are also appended to a local spool file as they go
// out; at the end the hash runs over head, part 1's chunks and the spool (local disk, bounded memory), and the spool
// is deleted.
import { createHash, randomBytes } from 'node:crypto';
import { open, unlink, type FileHandle } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { MIN_PART_BYTES, MultipartUpload, putBytes } from '../server/storage';

const concat = (pieces: Uint8Array[]) => {
  const out = new Uint8Array(pieces.reduce((a, p) => a + p.length, 0));
  let at = 0;
  for (const p of pieces) {
    out.set(p, at);
    at += p.length;
  }
  return out;
};

export class ClipUpload {
  private first: Uint8Array[] = [];
  private firstBytes = 0;
  private filling: Uint8Array[] = [];
  private fillingBytes = 0;
  private nextPart = 2;
  private upload: Promise<MultipartUpload> | null = null;
  private sending: Promise<void>[] = [];
  private failure: unknown = null;
  private spool: { path: string; file: Promise<FileHandle>; written: Promise<void> } | null = null;
  /** Chunk bytes received so far. */
  chunkBytes = 0;

  constructor(
    readonly key: string,
    private readonly contentType: string,
    private readonly signal: AbortSignal,
    private readonly partBytes = 8 * 1024 * 1024,
  ) {}

  /** Takes the next chunk (in clip order); throws if an earlier part failed to upload. */
  add(chunk: Uint8Array): void {
    if (this.failure) throw this.failure;
    this.chunkBytes += chunk.length;
    if (this.firstBytes < MIN_PART_BYTES) {
      this.first.push(chunk);
      this.firstBytes += chunk.length;
      return;
    }
    this.filling.push(chunk);
    this.fillingBytes += chunk.length;
    if (this.fillingBytes >= this.partBytes) this.sendFilling();
  }

  private sendFilling(): void {
    const body = concat(this.filling);
    this.filling = [];
    this.fillingBytes = 0;
    const partNumber = this.nextPart++;
    this.spoolPart(body);
    this.upload ??= MultipartUpload.start(this.key, this.contentType, this.signal);
    const sent = this.upload.then((u) => u.part(partNumber, body, this.signal));
    sent.catch((err) => {
      this.failure ??= err;
    });
    this.sending.push(sent);
  }

  /** Appends a part sent before the head to the spool, in order (the hash needs it after the head). */
  private spoolPart(body: Uint8Array): void {
    if (!this.spool) {
      const file = path.join(tmpdir(), `tidemark-clip-${process.pid}-${randomBytes(6).toString('hex')}.part`);
      this.spool = { path: file, file: open(file, 'w+'), written: Promise.resolve() };
    }
    const spool = this.spool;
    spool.written = spool.written.then(async () => {
      await (await spool.file).write(body);
    });
    spool.written.catch((err) => {
      this.failure ??= err;
    });
  }

  /** Hashes the spooled parts into `hash` in order, then deletes the spool. */
  private async hashSpool(hash: ReturnType<typeof createHash>): Promise<void> {
    const spool = this.spool;
    if (!spool) return;
    await spool.written;
    const fh = await spool.file;
    const buffer = Buffer.allocUnsafe(1024 * 1024);
    for (let at = 0; ; ) {
      const { bytesRead } = await fh.read(buffer, 0, buffer.length, at);
      if (bytesRead === 0) break;
      hash.update(buffer.subarray(0, bytesRead));
      at += bytesRead;
    }
    await this.dropSpool();
  }

  private async dropSpool(): Promise<void> {
    const spool = this.spool;
    this.spool = null;
    if (!spool) return;
    await spool.written.catch(() => {});
    await (await spool.file.catch(() => null))?.close().catch(() => {});
    await unlink(spool.path).catch(() => {});
  }

  /** Sends what is left with the head in front; resolves to the stored object's size in bytes and its SHA-256 (hex). */
  async finish(head: Uint8Array): Promise<{ bytes: number; sha256: string }> {
    this.signal.throwIfAborted();
    if (this.failure) throw this.failure;
    const partOne = concat([head, ...this.first]);
    if (this.fillingBytes === 0 && !this.upload) {
      await putBytes(this.key, partOne, this.contentType, this.signal);
    } else {
      if (this.fillingBytes > 0) this.sendFilling();
      await Promise.all(this.sending);
      const upload = await this.upload!;
      await upload.part(1, partOne, this.signal);
      await upload.complete(this.signal);
    }
    this.first = [];
    const hash = createHash('sha256').update(partOne);
    await this.hashSpool(hash);
    return { bytes: head.length + this.chunkBytes, sha256: hash.digest('hex') };
  }

  /** Stops: discards the parts sent so far (the caller deletes a finished object). */
  async abort(): Promise<void> {
    this.first = [];
    this.filling = [];
    this.fillingBytes = 0;
    await this.dropSpool();
    if (!this.upload) return;
    const upload = await this.upload.catch(() => null);
    await Promise.allSettled(this.sending);
    await upload?.abort();
  }
}
