// Streams a clip to the object store while it bakes. The head (magic, header, index) is known only at the end, so
// it goes into part 1, sent last together with the first chunks (at least 5 MiB, S3's smallest part but the last);
// later chunks go out as parts 2, 3, … of about 8 MiB as each fills. In memory: part 1's chunks, the filling part
// and the parts on the wire, never the whole clip. A clip under 5 MiB is one PUT at the end.
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
    this.upload ??= MultipartUpload.start(this.key, this.contentType, this.signal);
    const sent = this.upload.then((u) => u.part(partNumber, body, this.signal));
    sent.catch((err) => {
      this.failure ??= err;
    });
    this.sending.push(sent);
  }

  /** Sends what is left with the head in front; resolves to the stored object's size in bytes. */
  async finish(head: Uint8Array): Promise<number> {
    this.signal.throwIfAborted();
    if (this.failure) throw this.failure;
    if (this.fillingBytes === 0 && !this.upload) {
      await putBytes(this.key, concat([head, ...this.first]), this.contentType, this.signal);
    } else {
      if (this.fillingBytes > 0) this.sendFilling();
      await Promise.all(this.sending);
      const upload = await this.upload!;
      await upload.part(1, concat([head, ...this.first]), this.signal);
      await upload.complete(this.signal);
    }
    this.first = [];
    return head.length + this.chunkBytes;
  }

  /** Stops: discards the parts sent so far (the caller deletes a finished object). */
  async abort(): Promise<void> {
    this.first = [];
    this.filling = [];
    this.fillingBytes = 0;
    if (!this.upload) return;
    const upload = await this.upload.catch(() => null);
    await Promise.allSettled(this.sending);
    await upload?.abort();
  }
}
