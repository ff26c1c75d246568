// Scene hash: SHA-256 against published test vectors, and canonical JSON stability.
import { describe, it, expect } from 'vitest';
import { sha256Hex, utf8, canonicalJson, sceneHash } from '../../src/lib/scene/hash';
import { parseScene } from '../../src/lib/scene/schema';

describe('sha256Hex', () => {
  // FIPS 180-2, Appendix B (one-block and multi-block messages); empty string: widely published digest
  it.each([
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    ['abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq', '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1'],
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
  ])('hashes %j', (msg, digest) => {
    expect(sha256Hex(utf8(msg))).toBe(digest);
  });
  it('hashes a million "a" (FIPS 180-2 B.3)', () => {
    expect(sha256Hex(new Uint8Array(1_000_000).fill(0x61))).toBe('cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0');
  });
});

describe('sceneHash', () => {
  const doc = { version: 1, tank: { width: 1, height: 1, cellSize: 0.0625 }, pours: [{ id: 'a', shape: { type: 'circle', x: 0.5, y: 0.5, radius: 0.1 } }] };
  const parsed = (d: unknown) => { const r = parseScene(d); if (!r.ok) throw new Error('bad'); return r.scene; };
  it('ignores key order and equals for omitted vs explicit defaults', () => {
    expect(canonicalJson({ b: 1, a: [2, { d: 3, c: 4 }] })).toBe('{"a":[2,{"c":4,"d":3}],"b":1}');
    const explicit = { ...doc, physics: { flipRatio: 0.9 } };
    expect(sceneHash(parsed(explicit))).toBe(sceneHash(parsed(doc)));
    expect(sceneHash(parsed(doc))).toMatch(/^[0-9a-f]{64}$/);
  });
  it('changes when any value changes', () => {
    const moved = { ...doc, pours: [{ id: 'a', shape: { type: 'circle', x: 0.5, y: 0.51, radius: 0.1 } }] };
    expect(sceneHash(parsed(moved))).not.toBe(sceneHash(parsed(doc)));
  });
});
