// Draws export frames on a 2D canvas: background, the plate (optional), the splash in a render look from
// src/lib/render (the player's own pictures), then the burn-ins; and the slate. Browser only.
import { LookRenderer, type RenderLook } from '../render/looks';
import { ShutterRenderer, shutterFraction } from '../render/motionBlur';
import { layoutView, type ViewLayout } from '../render/view';
import type { PlateFrameSource } from '../plate';
import { BURN_IN_FONT, burnInLayout, slateLayout, type ExportLabels, type TextItem, type TextLayout } from './layout';
import { frameNeighbours, type ParticleSource } from './source';

export interface FrameRendererOptions {
  width: number;
  height: number;
  labels: ExportLabels;
  look: RenderLook;
  source: ParticleSource;
  /** The plate picture source, drawn under the splash when given. */
  plate: PlateFrameSource | null;
  /** The plate's size in its pixels (places the tank even when the underlay is off); null fits the tank. */
  plateSize: { width: number; height: number } | null;
  metresPerPixel: number | null;
  burnIns: boolean;
  /** Motion blur's shutter angle, degrees (render/motionBlur.ts); 0 or left out: none. */
  shutterAngle?: number;
}

const BACKGROUND = '#10232b';

/** Draws one line of text, shrinking it to fit its maxWidth, or wraps it over lines when `wrap`. */
export function drawText(ctx: CanvasRenderingContext2D, t: TextItem) {
  ctx.fillStyle = t.colour;
  ctx.textAlign = t.align;
  ctx.textBaseline = 'alphabetic';
  let size = t.size;
  ctx.font = `${t.weight} ${size}px "${BURN_IN_FONT}"`;
  if (t.wrap) {
    const words = t.text.split(/\s+/);
    const lines: string[] = [];
    let line = '';
    for (const w of words) {
      const next = line ? `${line} ${w}` : w;
      if (ctx.measureText(next).width > t.maxWidth && line) {
        lines.push(line);
        line = w;
      } else line = next;
    }
    if (line) lines.push(line);
    lines.forEach((l, i) => ctx.fillText(l, t.x, t.y + i * size * 1.3));
    return;
  }
  while (size > 6 && ctx.measureText(t.text).width > t.maxWidth) {
    size -= 1;
    ctx.font = `${t.weight} ${size}px "${BURN_IN_FONT}"`;
  }
  ctx.fillText(t.text, t.x, t.y);
}

export function drawLayout(ctx: CanvasRenderingContext2D, layout: TextLayout) {
  for (const b of layout.bands) {
    ctx.fillStyle = b.colour;
    ctx.fillRect(b.x, b.y, b.width, b.height);
  }
  for (const t of layout.texts) drawText(ctx, t);
}

export class FrameRenderer {
  readonly canvas: HTMLCanvasElement;
  readonly ctx: CanvasRenderingContext2D;
  private looks: LookRenderer;
  private layout: ViewLayout;
  private shutter: ShutterRenderer | null;

  constructor(private o: FrameRendererOptions) {
    this.canvas = document.createElement('canvas');
    this.canvas.width = o.width;
    this.canvas.height = o.height;
    this.ctx = this.canvas.getContext('2d', { willReadFrequently: true })!;
    this.looks = new LookRenderer(o.width, o.height);
    const fraction = shutterFraction(o.shutterAngle ?? 0);
    this.shutter = fraction > 0 ? new ShutterRenderer(this.looks, o.width, o.height, fraction) : null;
    const h = o.source.header;
    this.layout = layoutView({
      viewWidth: o.width,
      viewHeight: o.height,
      tankWidth: h.tankWidth,
      tankHeight: h.tankHeight,
      plate: o.plateSize,
      metresPerPixel: o.plateSize ? o.metresPerPixel : null,
    });
  }

  /** Changes the render look for the next frames drawn. */
  setLook(look: RenderLook) {
    this.o = { ...this.o, look };
  }

  /** Draws the slate for the exported range into the canvas. */
  drawSlate(first: number, last: number) {
    const { ctx, o } = this;
    ctx.clearRect(0, 0, o.width, o.height);
    drawLayout(ctx, slateLayout(o.labels, first, last, o.width, o.height));
  }

  /** Draws shot frame `frame` into the canvas (plate, splash composited "over" in premultiplied alpha, burn-ins). */
  async drawFrame(frame: number) {
    const { ctx, o } = this;
    ctx.fillStyle = BACKGROUND;
    ctx.fillRect(0, 0, o.width, o.height);
    const [particles, plateImage] = await Promise.all([o.source.frameAt(frame), o.plate ? o.plate.frameAt(frame) : Promise.resolve(null)]);
    const r = this.layout.plateRect;
    if (plateImage && r) ctx.drawImage(plateImage, r.x, r.y, r.width, r.height);
    // Walls and props are drawn even on a frame without liquid (the look draws them over the splash).
    if (particles.count > 0 || o.source.lookOptions.scene) {
      const splash = this.shutter
        ? this.shutter.render(o.look, await frameNeighbours(o.source, frame, particles), this.layout.toView, o.source.lookOptions)
        : this.looks.render(o.look, particles, this.layout.toView, o.source.lookOptions);
      const base = ctx.getImageData(0, 0, o.width, o.height);
      const dst = base.data;
      const src = splash.data;
      // out = src + dst·(1 − αsrc), src premultiplied, the canvas opaque.
      for (let i = 0; i < src.length; i += 4) {
        const a = src[i + 3];
        if (a === 0) continue;
        const k = 1 - a / 255;
        dst[i] = src[i] + dst[i] * k;
        dst[i + 1] = src[i + 1] + dst[i + 1] * k;
        dst[i + 2] = src[i + 2] + dst[i + 2] * k;
        dst[i + 3] = 255;
      }
      ctx.putImageData(base, 0, 0);
    }
    if (o.burnIns) drawLayout(ctx, burnInLayout(o.labels, frame, o.width, o.height));
  }

  /** The canvas pixels (RGBA, straight alpha). */
  imageData(): ImageData {
    return this.ctx.getImageData(0, 0, this.o.width, this.o.height);
  }

  /** The canvas as PNG bytes. */
  async png(): Promise<Uint8Array> {
    const blob = await new Promise<Blob>((resolve, reject) => this.canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('The browser could not encode a PNG frame'))), 'image/png'));
    return new Uint8Array(await blob.arrayBuffer());
  }
}
