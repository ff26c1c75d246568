// Runs once when the built server starts (imported ahead of the server entry by astro.config's `tidemarkBoot`):
// refuses to start with an unsafe production configuration, and records each request's TCP peer so throttles can
// tell a trusted proxy from a client (Astro's clientAddress believes the first X-Forwarded-For entry from anyone).
import { NodeApp } from 'astro/app/node';
import { productionProblem } from './config';
import { PEER_ADDRESS } from './client-address';
import { schedulePurge } from './housekeeping';
import { scheduleClientNoteMails } from './client-notes';

const problem = productionProblem();
if (problem) {
  console.error(`Tidemark will not start: ${problem}`);
  process.exit(1);
}

type CreateRequest = typeof NodeApp.createRequest;
const original: CreateRequest = NodeApp.createRequest.bind(NodeApp);
NodeApp.createRequest = ((req: Parameters<CreateRequest>[0], options?: Parameters<CreateRequest>[1]) => {
  const request = original(req, options);
  const peer = req.socket?.remoteAddress;
  if (peer) Reflect.set(request, PEER_ADDRESS, peer);
  return request;
}) as CreateRequest;

// Old throttle hits, sign-in attempts and finished bake jobs go on a schedule.
schedulePurge();
// Client comments held back by their version's mail window (and any a restart left in the outbox) go on a timer.
scheduleClientNoteMails();
