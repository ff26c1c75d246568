// Reads a stored clip over HTTP Range requests through a short-lived URL, asking for fresh URLs when one is refused.

/**
 * Returns a range fetcher for ClipReader.open. `currentUrl` gives the clip URL in use; `refresh` gets new URLs
 * (an expired presigned URL answers 403). Up to three tries per range.
 */
export function refreshingRangeFetcher(currentUrl: () => string, refresh: () => Promise<unknown>) {
  return async (start: number, end: number): Promise<Uint8Array> => {
    for (let attempt = 0; ; attempt++) {
      let res: Response | null = null;
      try {
        res = await fetch(currentUrl(), { headers: { range: `bytes=${start}-${end}` } });
      } catch {
        res = null;
      }
      if (res && (res.status === 206 || res.status === 200)) {
        const bytes = new Uint8Array(await res.arrayBuffer());
        // A server that ignores Range answers 200 with the whole object: cut out the part asked for.
        return res.status === 200 && bytes.length > end - start + 1 ? bytes.subarray(start, end + 1) : bytes;
      }
      if (attempt >= 2) throw new Error(res ? `Could not read the baked clip (HTTP ${res.status})` : 'Could not reach the object store holding the baked clip');
      await refresh();
    }
  };
}
