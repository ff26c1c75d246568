// Demo plates painted in code (no image files to ship): a rooftop pool at sunset and a harbour wall in a storm.
// Demo only. Returns PNG bytes.
import { encodePng } from './png';

// Kept exported from here for the tests and scripts that import it from the demo plates.
export { encodePng };

type Rgb = [number, number, number];

const mix = (a: Rgb, b: Rgb, t: number): Rgb => [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t, a[2] + (b[2] - a[2]) * t];

function paint(width: number, height: number, shade: (u: number, v: number) => Rgb): Uint8Array {
  const rgb = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const c = shade(x / width, 1 - y / height); // v = 0 at the bottom
      const i = (y * width + x) * 3;
      rgb[i] = Math.max(0, Math.min(255, c[0]));
      rgb[i + 1] = Math.max(0, Math.min(255, c[1]));
      rgb[i + 2] = Math.max(0, Math.min(255, c[2]));
    }
  }
  return encodePng(width, height, rgb);
}

/** Rooftop pool at sunset: the pool's water line sits at half the frame height (matches the demo scene). */
export function rooftopPoolPlate(width = 1920, height = 1080): Uint8Array {
  return paint(width, height, (u, v) => {
    if (v > 0.62) {
      const t = (v - 0.62) / 0.38;
      let c = mix([250, 170, 110], [70, 90, 150], t);
      const sun = Math.hypot((u - 0.72) * 1.78, v - 0.7);
      if (sun < 0.06) c = mix([255, 236, 190], c, sun / 0.06);
      // City skyline.
      const bldg = 0.62 + 0.06 * Math.abs(Math.sin(Math.floor(u * 23) * 1.7)) + (Math.floor(u * 23) % 3 === 0 ? 0.05 : 0);
      if (v < bldg) c = mix([40, 42, 60], [70, 60, 80], (v - 0.62) / 0.12);
      return c;
    }
    if (v > 0.5) return mix([196, 178, 150], [170, 150, 125], (v - 0.5) / 0.12); // pool deck
    const tile = (Math.abs((u * 40) % 1) < 0.04 || Math.abs((v * 22) % 1) < 0.06) ? 0.82 : 1;
    const deep = mix([60, 180, 205], [20, 90, 140], 1 - v / 0.5);
    return [deep[0] * tile, deep[1] * tile, deep[2] * tile];
  });
}

/** Harbour wall in a storm: the stone wall stands at the right eighth of the frame (matches the demo scene). */
export function harbourWallPlate(width = 1920, height = 1080): Uint8Array {
  return paint(width, height, (u, v) => {
    if (u > 0.875 && v < 0.67) {
      const row = Math.floor(v * 24);
      const brick = (Math.abs((v * 24) % 1) < 0.08 || Math.abs(((u * 30 + (row % 2) * 0.5) % 1)) < 0.05) ? 0.7 : 1;
      const stone = mix([120, 116, 108], [90, 88, 84], (row * 7919) % 5 / 5);
      return [stone[0] * brick, stone[1] * brick, stone[2] * brick];
    }
    if (v > 0.45) {
      const cloud = 0.5 + 0.5 * Math.sin(u * 9 + Math.sin(v * 13) * 2) * Math.sin(v * 7);
      return mix([70, 80, 92], [120, 130, 140], cloud * (v - 0.45) / 0.55);
    }
    const swell = 0.5 + 0.5 * Math.sin(u * 60 + v * 20);
    return mix([22, 52, 66], [40, 78, 92], swell * v / 0.45);
  });
}

/**
 * The demo can's picture: a cut-out of a fictional soda can ("Kestrelwell", no real brand) painted in code, RGBA with
 * straight alpha, transparent outside the can's silhouette (rounded shoulders). `width` × `height` px in the can's
 * 66 × 122 mm proportions. A red body lit as a cylinder, ribbed silver ends, a white wave band and a gold sun.
 * Returns PNG bytes.
 */
export function demoCanPicture(width = 132, height = 244): Uint8Array {
  const rgba = new Uint8Array(width * height * 4);
  const red: Rgb = [210, 60, 50];
  const silver: Rgb = [198, 202, 208];
  const shoulder = 0.06; // of the height: the rounded rim at top and bottom
  for (let y = 0; y < height; y++) {
    const v = (y + 0.5) / height; // 0 at the top
    for (let x = 0; x < width; x++) {
      const u = (x + 0.5) / width;
      const across = 2 * u - 1; // −1 … 1 across the can
      // Rounded shoulders: the corners are cut on an ellipse, so the picture has real transparency.
      const edge = Math.min(v, 1 - v);
      const inset = edge < shoulder ? 1 - Math.sqrt(Math.max(0, 1 - ((shoulder - edge) / shoulder) ** 2)) : 0;
      const halfWidth = 1 - 0.12 * inset;
      const i = (y * width + x) * 4;
      if (Math.abs(across) > halfWidth) continue; // alpha 0
      // Cylinder lighting: Lambert on the curved side, a highlight left of centre.
      const nx = across / halfWidth;
      const light = 0.55 + 0.45 * Math.sqrt(Math.max(0, 1 - nx * nx)) + 0.35 * Math.exp(-(((nx + 0.35) / 0.12) ** 2));
      let c: Rgb = red;
      if (v < 0.09 || v > 0.91) c = Math.floor(v * height) % 4 < 2 ? silver : mix(silver, [120, 124, 130], 0.4); // ribbed ends
      else {
        // A white wave band across the middle and a gold sun above it: a made-up label.
        const wave = 0.55 + 0.05 * Math.sin(u * Math.PI * 2.2 + 0.6);
        if (v > wave && v < wave + 0.09) c = [246, 242, 232];
        const sun = Math.hypot((u - 0.5) * (width / height), v - 0.36);
        if (sun < 0.085) c = [244, 190, 64];
        else if (sun < 0.1) c = [246, 242, 232];
      }
      rgba[i] = Math.min(255, c[0] * light);
      rgba[i + 1] = Math.min(255, c[1] * light);
      rgba[i + 2] = Math.min(255, c[2] * light);
      // Anti-aliased silhouette: the last half pixel fades out.
      const px = (halfWidth - Math.abs(across)) * (width / 2);
      rgba[i + 3] = Math.round(255 * Math.max(0, Math.min(1, px + 0.5)));
    }
  }
  return encodePng(width, height, rgba, 4);
}
