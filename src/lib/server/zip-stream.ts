// A ZIP written as a stream (fflate's streaming Zip): each entry is opened only when the reader has taken the bytes
// before it, so a large download (a turnover's MP4s) never sits whole in memory and starts before the last file is read.
import { Zip, ZipDeflate, ZipPassThrough } from 'fflate';

export interface ZipStreamEntry {
  /** The file's name inside the ZIP. */
  name: string;
  /** true: stored as it is (files that are compressed already, such as MP4); else deflated. */
  stored?: boolean;
  /** The file's bytes, or a function that opens them as a stream when the ZIP reaches this entry. */
  data: Uint8Array | (() => Promise<ReadableStream<Uint8Array>>);
}

/** Returns the ZIP of the entries, in order, as a byte stream pulled by its reader (backpressure: one chunk at a time). */
export function zipStream(entries: ZipStreamEntry[]): ReadableStream<Uint8Array> {
  const chunks = zipChunks(entries);
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      try {
        const next = await chunks.next();
        if (next.done) controller.close();
        else controller.enqueue(next.value);
      } catch (e) {
        controller.error(e);
      }
    },
    async cancel() {
      await chunks.return(undefined);
    },
  });
}

async function* zipChunks(entries: ZipStreamEntry[]): AsyncGenerator<Uint8Array> {
  const ready: Uint8Array[] = [];
  let failure: Error | null = null;
  const zip = new Zip((err, chunk) => {
    if (err) failure = err;
    else if (chunk.length) ready.push(chunk);
  });
  const drain = function* () {
    if (failure) throw failure;
    while (ready.length) yield ready.shift()!;
  };
  for (const entry of entries) {
    const file = entry.stored ? new ZipPassThrough(entry.name) : new ZipDeflate(entry.name, { level: 6 });
    zip.add(file);
    if (entry.data instanceof Uint8Array) {
      file.push(entry.data, true);
      yield* drain();
      continue;
    }
    const reader = (await entry.data()).getReader();
    let finished = false;
    try {
      while (!finished) {
        const { done, value } = await reader.read();
        finished = done;
        file.push(value ?? new Uint8Array(0), done);
        yield* drain();
      }
    } finally {
      // A reader that stopped early (the download was cancelled) lets go of the source stream too.
      if (!finished) await reader.cancel().catch(() => undefined);
      reader.releaseLock();
    }
  }
  zip.end();
  yield* drain();
}
