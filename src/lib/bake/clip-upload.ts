// Streams a clip to the object store while it bakes. The head (magic, header, index) is known only at the end, so
// it goes into part 1, sent last together with the first chunks (at least 5 MiB, S3's smallest part but the last);
// later chunks go out as parts 2, 3, … of about 8 MiB as each fills. In memory: part 1's chunks, the filling part
// and the parts on the wire, never the whole clip. A clip under 5 MiB is one PUT at the end.
// Backpressure: at most `partsInFlight` parts are on the wire; a filled part waits for a free slot, and room()
// resolves once no part waits. A caller that awaits room() after each add() holds at most limitBytes(maxChunk)
// bytes here however slow the store is (the bake thread is paused meanwhile, host.ts).
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

export interface ClipUploadOptions {
  /** Size at which a filling part is sent (default 8 MiB). */
  partBytes?: number;
  /** Parts on the wire at once (default 2). */
  partsInFlight?: number;
  /** Sends one part (default: the store's UploadPart); tests put a slow store in front. */
  sendPart?: (upload: MultipartUpload, partNumber: number, body: Uint8Array, signal: AbortSignal) => Promise<void>;
}

const sendToStore = (u: MultipartUpload, n: number, body: Uint8Array, signal: AbortSignal) => u.part(n, body, signal);

export class ClipUpload {
  private first: Uint8Array[] = [];
  private firstBytes = 0;
  private filling: Uint8Array[] = [];
  private fillingBytes = 0;
  private nextPart = 2;
  private upload: Promise<MultipartUpload> | null = null;
  private sending: Promise<void>[] = [];
  /** Filled parts waiting for a slot on the wire. */
  private waiting: { partNumber: number; body: Uint8Array }[] = [];
  private inFlight = 0;
  private wake: (() => void)[] = [];
  private readonly partBytes: number;
  private readonly partsInFlight: number;
  private readonly sendPart: NonNullable<ClipUploadOptions['sendPart']>;
  private failure: unknown = null;
  private spool: { path: string; file: Promise<FileHandle>; written: Promise<void> } | null = null;
  /** Chunk bytes received so far. */
  chunkBytes = 0;
  /** Chunk bytes held in memory now (part 1's chunks, the filling part, waiting parts, parts on the wire). */
  bufferedBytes = 0;
  /** The most bufferedBytes has been. */
  peakBufferedBytes = 0;

  constructor(
    readonly key: string,
    private readonly contentType: string,
    private readonly signal: AbortSignal,
    o: ClipUploadOptions = {},
  ) {
    this.partBytes = o.partBytes ?? 8 * 1024 * 1024;
    this.partsInFlight = Math.max(1, o.partsInFlight ?? 2);
    this.sendPart = o.sendPart ?? sendToStore;
  }

  /**
   * The most bytes held when the caller awaits room() after each add() of chunks up to maxChunk bytes: part 1's
   * chunks (< MIN_PART_BYTES + maxChunk), the filling part (< partBytes), one waiting part and the parts on the wire
   * (each < partBytes + maxChunk).
   */
  limitBytes(maxChunk: number): number {
    return MIN_PART_BYTES + maxChunk + this.partBytes + (this.partsInFlight + 1) * (this.partBytes + maxChunk);
  }

  /** Resolves when no filled part waits for a slot (or the upload failed or stopped: the next add() throws). */
  room(): Promise<void> {
    return this.until(() => this.waiting.length === 0);
  }

  private until(ready: () => boolean): Promise<void> {
    return new Promise<void>((resolve) => {
      const check = () => {
        if (ready() || this.failure || this.signal.aborted) resolve();
        else this.wake.push(check);
      };
      check();
    });
  }

  private wakeAll(): void {
    const w = this.wake;
    this.wake = [];
    for (const f of w) f();
  }

  /** Takes the next chunk (in clip order); throws if an earlier part failed to upload. */
  add(chunk: Uint8Array): void {
    if (this.failure) throw this.failure;
    this.chunkBytes += chunk.length;
    this.bufferedBytes += chunk.length;
    this.peakBufferedBytes = Math.max(this.peakBufferedBytes, this.bufferedBytes);
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
    this.waiting.push({ partNumber, body });
    this.pump();
  }

  /** Puts waiting parts on the wire while a slot is free. */
  private pump(): void {
    while (this.inFlight < this.partsInFlight && this.waiting.length > 0 && !this.failure) {
      const { partNumber, body } = this.waiting.shift()!;
      this.inFlight++;
      this.upload ??= MultipartUpload.start(this.key, this.contentType, this.signal);
      const sent = this.upload.then((u) => this.sendPart(u, partNumber, body, this.signal));
      sent
        .catch((err) => {
          this.failure ??= err;
        })
        .finally(() => {
          this.inFlight--;
          this.bufferedBytes -= body.length;
          this.pump();
          this.wakeAll();
        });
      this.sending.push(sent);
    }
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
      await this.until(() => this.waiting.length === 0 && this.inFlight === 0);
      await Promise.all(this.sending);
      const upload = await this.upload!;
      await upload.part(1, partOne, this.signal);
      await upload.complete(this.signal);
    }
    this.first = [];
    this.bufferedBytes = 0;
    const hash = createHash('sha256').update(partOne);
    await this.hashSpool(hash);
    return { bytes: head.length + this.chunkBytes, sha256: hash.digest('hex') };
  }

  /** Stops: discards the parts sent so far (the caller deletes a finished object). */
  async abort(): Promise<void> {
    this.first = [];
    this.filling = [];
    this.fillingBytes = 0;
    this.waiting = [];
    this.wakeAll();
    await this.dropSpool();
    if (!this.upload) return;
    const upload = await this.upload.catch(() => null);
    await Promise.allSettled(this.sending);
    await upload?.abort();
  }
}
