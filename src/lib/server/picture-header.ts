// Reading an uploaded prop picture's header for transparency, without decoding it (the server never decodes WebP).
// Pure: bytes in, answer out.

/**
 * Whether a PNG or WebP header declares transparency; null when the header is not one of those.
 * PNG (ISO/IEC 15948:2003 §11.2.2): IHDR's colour type (byte 25) 4 = greyscale + alpha, 6 = RGB + alpha; types 0, 2
 * and 3 are transparent only with a tRNS chunk (§11.3.2.1), which comes before the first IDAT.
 * WebP (Google, "WebP Container Specification", RIFF layout): an extended file's VP8X chunk has the alpha flag 0x10
 * in its first flags byte (file byte 20); a simple lossless file's VP8L header (signature 0x2f at byte 20) carries
 * `alpha_is_used` as bit 28 of the little-endian 32 bits after it ("WebP Lossless Bitstream Specification", RIFF
 * header); a simple lossy file (VP8 chunk) has no alpha. RFC 9649 describes both WebP layouts. Section numbers and
 * bit positions from memory.
 */
export function declaresAlpha(bytes: Uint8Array): boolean | null {
  const ascii = (at: number, n: number) => String.fromCharCode(...bytes.subarray(at, at + n));
  if (bytes.length >= 33 && bytes[0] === 0x89 && ascii(1, 3) === 'PNG') {
    const colourType = bytes[25];
    if (colourType === 4 || colourType === 6) return true;
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    for (let pos = 8; pos + 8 <= bytes.length; ) {
      const len = view.getUint32(pos);
      const type = ascii(pos + 4, 4);
      if (type === 'tRNS') return true;
      if (type === 'IDAT' || type === 'IEND') return false;
      pos += 12 + len;
    }
    return false;
  }
  if (bytes.length >= 30 && ascii(0, 4) === 'RIFF' && ascii(8, 4) === 'WEBP') {
    const chunk = ascii(12, 4);
    if (chunk === 'VP8X') return (bytes[20] & 0x10) !== 0;
    if (chunk === 'VP8L' && bytes[20] === 0x2f) {
      const bits = (bytes[21] | (bytes[22] << 8) | (bytes[23] << 16) | (bytes[24] << 24)) >>> 0;
      return ((bits >>> 28) & 1) === 1;
    }
    return false;
  }
  return null;
}
