// Stable scene identity for the bake queue: canonical JSON (sorted keys) hashed with SHA-256 (FIPS 180-4).
// Pure TypeScript and synchronous, so it runs the same in a browser, a Web Worker and Node.
import { DEFAULT_LIQUID, type Scene } from './schema';

/** JSON with object keys sorted at every level and no whitespace; arrays keep their order. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) throw new Error('canonicalJson: non-finite number');
    return JSON.stringify(value) ?? 'null';
  }
  if (Array.isArray(value)) return '[' + value.map((v) => canonicalJson(v === undefined ? null : v)).join(',') + ']';
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj).filter((k) => obj[k] !== undefined).sort();
  return '{' + keys.map((k) => JSON.stringify(k) + ':' + canonicalJson(obj[k])).join(',') + '}';
}

const K = new Uint32Array([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
  0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
  0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
  0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
  0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
  0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
  0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
  0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2,
]);

/** SHA-256 (FIPS 180-4) of the bytes; returns 64 lowercase hex digits. */
export function sha256Hex(bytes: Uint8Array): string {
  const len = bytes.length;
  const padded = new Uint8Array(((len + 9 + 63) >> 6) << 6);
  padded.set(bytes);
  padded[len] = 0x80;
  const bitLenHi = Math.floor(len / 0x20000000), bitLenLo = (len << 3) >>> 0;
  const view = new DataView(padded.buffer);
  view.setUint32(padded.length - 8, bitLenHi);
  view.setUint32(padded.length - 4, bitLenLo);
  const H = new Uint32Array([0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19]);
  const W = new Uint32Array(64);
  for (let off = 0; off < padded.length; off += 64) {
    for (let t = 0; t < 16; t++) W[t] = view.getUint32(off + 4 * t);
    for (let t = 16; t < 64; t++) {
      const w15 = W[t - 15], w2 = W[t - 2];
      const s0 = ((w15 >>> 7) | (w15 << 25)) ^ ((w15 >>> 18) | (w15 << 14)) ^ (w15 >>> 3);
      const s1 = ((w2 >>> 17) | (w2 << 15)) ^ ((w2 >>> 19) | (w2 << 13)) ^ (w2 >>> 10);
      W[t] = (W[t - 16] + s0 + W[t - 7] + s1) | 0;
    }
    let a = H[0], b = H[1], c = H[2], d = H[3], e = H[4], f = H[5], g = H[6], h = H[7];
    for (let t = 0; t < 64; t++) {
      const S1 = ((e >>> 6) | (e << 26)) ^ ((e >>> 11) | (e << 21)) ^ ((e >>> 25) | (e << 7));
      const ch = (e & f) ^ (~e & g);
      const t1 = (h + S1 + ch + K[t] + W[t]) | 0;
      const S0 = ((a >>> 2) | (a << 30)) ^ ((a >>> 13) | (a << 19)) ^ ((a >>> 22) | (a << 10));
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const t2 = (S0 + maj) | 0;
      h = g; g = f; f = e; e = (d + t1) | 0; d = c; c = b; b = a; a = (t1 + t2) | 0;
    }
    H[0] += a; H[1] += b; H[2] += c; H[3] += d; H[4] += e; H[5] += f; H[6] += g; H[7] += h;
  }
  let hex = '';
  for (let i = 0; i < 8; i++) hex += H[i].toString(16).padStart(8, '0');
  return hex;
}

/** UTF-8 bytes of a string (TextEncoder exists in browsers, workers and Node). */
export function utf8(s: string): Uint8Array {
  return new TextEncoder().encode(s);
}

/**
 * SHA-256 hex of the scene's canonical JSON: equal scenes (after defaults) give equal hashes. A scene that
 * version 1 could express (the one default water liquid, every prop keyed with no free-prop fields) is hashed
 * in its version 1 form, so scenes saved before version 2 keep their hash (and their baked clips).
 */
export function sceneHash(scene: Scene): string {
  // A prop's picture is drawn over the baked clip, never simulated: choosing one needs no new bake.
  const baked = scene.props.some((p) => p.picture !== undefined) ? { ...scene, props: scene.props.map(({ picture: _p, ...p }) => p) } : scene;
  return sha256Hex(utf8(canonicalJson(asVersion1(baked) ?? baked)));
}

/** The version 1 form of a scene, or null when it uses anything version 2 added. */
export function asVersion1(scene: Scene): Record<string, unknown> | null {
  if (scene.liquids.length !== 1 || canonicalJson(scene.liquids[0]) !== canonicalJson(DEFAULT_LIQUID)) return null;
  const water = DEFAULT_LIQUID.id;
  if (scene.pours.some((p) => p.liquid !== water) || scene.spouts.some((p) => p.liquid !== water)) return null;
  const freeFields = ['density', 'velocity', 'spin', 'releaseFrame'] as const;
  if (scene.props.some((p) => p.motion !== 'keyed' || freeFields.some((f) => p[f] !== undefined))) return null;
  const { liquids: _liquids, ...rest } = scene;
  return {
    ...rest,
    version: 1,
    pours: scene.pours.map(({ liquid: _l, ...p }) => p),
    spouts: scene.spouts.map(({ liquid: _l, ...p }) => p),
    props: scene.props.map(({ motion: _m, ...p }) => p),
  };
}
