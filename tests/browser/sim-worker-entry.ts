// One bake in a worker: receives { scene, frames } (a scene document and a frame count), parses the scene,
// bakes and posts back { checksum } (or { error }). The same module runs as a browser Web Worker (bundled
// by the test with esbuild) and as a Node worker_threads worker (through tests/sim/helpers/worker-boot.mjs).
import { parseScene } from '../../src/lib/scene/schema';
import { bakeChecksum } from '../../src/lib/sim/bake';

interface BakeRequest { scene: unknown; frames: number }
type Reply = { checksum: string } | { error: string };

function handle(req: BakeRequest): Reply {
  const parsed = parseScene(req.scene);
  if (!parsed.ok) return { error: JSON.stringify(parsed.errors) };
  return { checksum: bakeChecksum(parsed.scene, req.frames) };
}

const isNode = typeof process !== 'undefined' && typeof process.versions?.node === 'string';
if (isNode) {
  // Node worker thread: the request arrives as workerData, the reply goes to the parent port
  void import('node:worker_threads').then(({ parentPort, workerData }) => {
    parentPort?.postMessage(handle(workerData.request as BakeRequest));
  });
} else {
  const scope = self as unknown as { onmessage: ((e: MessageEvent<BakeRequest>) => void) | null; postMessage(m: Reply): void };
  scope.onmessage = (e) => scope.postMessage(handle(e.data));
}
