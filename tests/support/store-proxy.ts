// A small HTTP proxy in front of the S3 stand-in that can delay or hold chosen requests, and records what it saw.
import { createServer, request, type IncomingMessage } from 'node:http';

export type ProxyRule = (req: IncomingMessage) => { delayMs?: number; hold?: boolean } | undefined;

export interface SeenRequest {
  method: string;
  url: string;
  at: number;
  /** When it was passed on to the store (null: held, or the client gave up first). */
  forwardedAt: number | null;
  /** The client closed the connection before the request was passed on. */
  abandoned: boolean;
}

export async function startStoreProxy(target: string, rule: ProxyRule) {
  const seen: SeenRequest[] = [];
  const listeners: ((r: SeenRequest) => void)[] = [];
  const server = createServer((req, res) => {
    const entry: SeenRequest = { method: req.method!, url: req.url!, at: Date.now(), forwardedAt: null, abandoned: false };
    seen.push(entry);
    for (const l of listeners) l(entry);
    const action = rule(req) ?? {};
    if (action.hold) return; // never answered: the client waits until it gives up or is killed
    req.pause();
    let gone = false;
    res.on('close', () => {
      if (entry.forwardedAt === null) {
        gone = true;
        entry.abandoned = true;
      }
    });
    setTimeout(() => {
      if (gone) return;
      entry.forwardedAt = Date.now();
      const up = request(target + req.url, { method: req.method, headers: req.headers }, (upRes) => {
        res.writeHead(upRes.statusCode ?? 502, upRes.headers);
        upRes.pipe(res);
      });
      up.on('error', () => res.destroy());
      res.on('close', () => up.destroy());
      req.pipe(up);
      req.resume();
    }, action.delayMs ?? 0);
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const url = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  return {
    url,
    seen,
    /** Resolves with the first request (seen from now on or before) that matches. */
    waitFor(match: (r: SeenRequest) => boolean): Promise<SeenRequest> {
      const found = seen.find(match);
      if (found) return Promise.resolve(found);
      return new Promise((resolve) => listeners.push((r) => match(r) && resolve(r)));
    },
    close: () => {
      server.closeAllConnections();
      return new Promise<void>((r) => server.close(() => r()));
    },
  };
}
