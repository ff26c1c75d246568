// Comp passes: for each frame, the splash with alpha (liquid and props over transparency, straight alpha) and a liquid
// matte (white liquid on black), both at plate resolution, as PNGs named by frame number; zipped with a README.txt
// naming the passes. Free of the DOM (fast-png encodes, fflate zips), so Node tests run the same code as the browser.
import { encode } from 'fast-png';
import type { DensityField } from '../render/looks';
import type { PixelImage } from '../render/image';
import { versionLabel } from '../vocab';
import { exportTimecode, type ExportLabels } from './layout';
import { zipFrames } from './zip';

/** The passes, by folder inside the ZIP. */
export const PASSES = {
  rgba: 'Splash with alpha: liquid, spray, walls and props over transparency (straight, not premultiplied, alpha).',
  matte: 'Liquid matte: white where the liquid is, black elsewhere (anti-aliased edge; props and walls not included).',
} as const;
export type PassName = keyof typeof PASSES;

/** The name of a frame of a pass in the ZIP: rgba/SHOT_v003.1001.png, matte/SHOT_v003.1001.png. */
export function passEntryName(labels: Pick<ExportLabels, 'shotCode' | 'versionNumber'>, pass: PassName, frame: number): string {
  return `${pass}/${labels.shotCode.replace(/[^A-Za-z0-9_-]+/g, '-')}_${versionLabel(labels.versionNumber)}.${String(frame).padStart(4, '0')}.png`;
}

/**
 * Liquid coverage of each view pixel, 0–255, from the surface look's density field: the ρ/ρ₀ = ½ contour, with the
 * same bilinear reading and one-pixel anti-aliased edge the surface look draws (cover = clamp((r − ½)·2.5·cellPx + ½)).
 */
export function liquidCoverage(field: DensityField, width: number, height: number, out = new Uint8Array(width * height)): Uint8Array {
  const { cellPx, gw, gh, ratio } = field;
  const toPx = 2.5 * cellPx;
  // A cell (i, j) is centred on view pixel ((i − ½)·cellPx): pixel centre p + ½ sits at grid g = (p + ½)/cellPx + ½.
  const at = (p: number, n: number) => {
    const g = (p + 0.5) / cellPx + 0.5;
    const i = Math.max(0, Math.min(n - 2, Math.floor(g)));
    return [i, Math.max(0, Math.min(1, g - i))] as const;
  };
  const cols = Array.from({ length: width }, (_, px) => at(px, gw));
  for (let py = 0; py < height; py++) {
    const [j, fy] = at(py, gh);
    for (let px = 0; px < width; px++) {
      const [i, fx] = cols[px];
      const k = j * gw + i;
      const top = ratio[k] + (ratio[k + 1] - ratio[k]) * fx;
      const bottom = ratio[k + gw] + (ratio[k + gw + 1] - ratio[k + gw]) * fx;
      const cover = ((top + (bottom - top) * fy) - 0.5) * toPx + 0.5;
      out[py * width + px] = cover <= 0 ? 0 : cover >= 1 ? 255 : Math.round(cover * 255);
    }
  }
  return out;
}

/** The matte pass as opaque RGBA: grey = coverage (what a PNG decoder gives back for the grey PNG). */
export function matteRgba(coverage: Uint8Array): Uint8Array {
  const out = new Uint8Array(coverage.length * 4);
  for (let p = 0; p < coverage.length; p++) {
    const c = coverage[p];
    out[4 * p] = c;
    out[4 * p + 1] = c;
    out[4 * p + 2] = c;
    out[4 * p + 3] = 255;
  }
  return out;
}

/** A premultiplied look image as straight-alpha RGBA (what PNG stores). */
export function straightRgba(img: PixelImage): Uint8Array {
  const src = img.data;
  const out = new Uint8Array(src.length);
  for (let i = 0; i < src.length; i += 4) {
    const a = src[i + 3];
    if (a === 0) continue;
    const k = 255 / a;
    out[i] = Math.min(255, Math.round(src[i] * k));
    out[i + 1] = Math.min(255, Math.round(src[i + 1] * k));
    out[i + 2] = Math.min(255, Math.round(src[i + 2] * k));
    out[i + 3] = a;
  }
  return out;
}

/** RGBA bytes → PNG bytes (8 bits a channel, with alpha; fast deflate: the ZIP time is mostly PNG encoding). */
export function encodeRgbaPng(width: number, height: number, rgba: Uint8Array): Uint8Array {
  return encode({ width, height, data: rgba, channels: 4, depth: 8 }, { zlib: { level: 1 } });
}

/** The matte pass as a greyscale PNG (grey = coverage, 8 bits): a quarter of the RGBA bytes to encode. */
export function encodeMattePng(width: number, height: number, coverage: Uint8Array): Uint8Array {
  return encode({ width, height, data: coverage, channels: 1, depth: 8 }, { zlib: { level: 1 } });
}

/** The README.txt of a passes ZIP: which passes it holds, how the files are named, the frames and size. */
export function passesReadme(labels: ExportLabels, first: number, last: number, width: number, height: number): string {
  const lines = [
    `Comp passes of ${labels.shotCode} ${versionLabel(labels.versionNumber)}, frames ${first}-${last} (${exportTimecode(labels, first)} to ${exportTimecode(labels, last)}), ${width}x${height} px (plate resolution).`,
    '',
    'Passes (one folder each, one PNG a frame, named SHOT_vNNN.FRAME.png by shot frame number):',
    ...Object.entries(PASSES).map(([name, what]) => `  ${name}/  ${what}`),
    '',
    'Previs only - not an engineering plan; plan practical water work with your licensed special-effects coordinator and local codes.',
    '',
  ];
  return lines.join('\r\n');
}

/** The passes ZIP: README.txt first, then the PNGs in the order given. */
export function zipPasses(readme: string, files: { name: string; png: Uint8Array }[]): Uint8Array {
  return zipFrames([{ name: 'README.txt', png: new TextEncoder().encode(readme) }, ...files]);
}
