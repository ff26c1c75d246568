// The player's render looks, drawn without a full-size RGBA upload a frame (8 MB at 1920×1080, which software WebGL,
// SwiftShader, can't keep up with). The CPU prepares small per-frame inputs with the shared LookRenderer
// (src/lib/render/looks.ts). "surface" (pixi.js 8, WebGL): the density field ρ/ρ₀ as a small 16-bit texture (two
// bytes a cell, about 60k cells) and the liquid colour and depth shade per cell (an RGBA8 texture of the same grid),
// sampled bilinearly by a quad over the liquid whose fragment shader draws fill, depth shading and lit edge exactly as
// the CPU look does. Walls and props: a pixi Graphics of a few polygons (src/lib/render/solids.ts outlines). "speed", and the surface's spray droplets: dots painted on the CPU into
// a 2D canvas over the WebGL one, at the view's size up to ~0.64 megapixels and at half size above (1920×1080 →
// 960×540, scaled up by the browser's compositor with image-rendering: pixelated); 50k GL points cost SwiftShader
// 30–55 ms a frame, this a few ms. (At half size dots land on even pixels: the one difference from the CPU look.)
import { Buffer, BufferImageSource, BufferUsage, Container, Geometry, GlProgram, Graphics, Mesh, Shader, Sprite, Texture, UniformGroup } from 'pixi.js';
import { rampColour } from '~/lib/render/image';
import {
  LookRenderer,
  SPEED_DOT_ALPHA,
  SPEED_RAMP,
  SPRAY_ALPHA,
  diffuseColour,
  SURFACE_SHADING,
  lifted,
  liquidColours,
  type LookOptions,
  type ParticleFrame,
  type RenderLook,
} from '~/lib/render/looks';
import { solidOutlines, type PropImage, type SolidOutline } from '~/lib/render/solids';
import { shapeBounds } from '~/lib/scene/shapes';
import type { ClipLook } from '~/lib/clip/format';
import type { TankToView } from '~/lib/render/view';

/** The density ratio ρ/ρ₀ that maps to the top of the 16-bit texture (the deep colour is reached near r ≈ 2.9). */
const DENSITY_RANGE = 4;

// Uniforms every pixi mesh gets: uProjectionMatrix and uWorldTransformMatrix (global), uTransformMatrix (local).
const MVP = /* glsl */ `
uniform mat3 uProjectionMatrix;
uniform mat3 uWorldTransformMatrix;
uniform mat3 uTransformMatrix;
vec4 toClip(vec2 viewPx) {
  mat3 mvp = uProjectionMatrix * uWorldTransformMatrix * uTransformMatrix;
  return vec4((mvp * vec3(viewPx, 1.0)).xy, 0.0, 1.0);
}`;

const SURFACE_VERTEX = /* glsl */ `
in vec2 aPosition; // view px
out vec2 vPos;
${MVP}
void main() {
  gl_Position = toClip(aPosition);
  vPos = aPosition;
}`;

// The same maths as LookRenderer's CPU surface (src/lib/render/looks.ts): (r − ½)·2.5·cellPx approximates the signed
// distance to the surface in pixels; liquid anti-aliased over a pixel, a 2-px edge line on it, deeper colour inside.
const SURFACE_FRAGMENT = /* glsl */ `
in vec2 vPos;       // pixel centre, view px
uniform sampler2D uDensity;
uniform sampler2D uTint;
uniform vec2 uTexSize;
uniform vec2 uTintSize;
uniform float uCellPx;
uniform float uRange;
uniform float uPx;  // view px per drawn pixel (2 when the canvas is drawn at half size, see viewPxPerTexel)
out vec4 finalColor;
void main() {
  // Grid coordinate of the pixel centre (cell k centred on pixel (k − 1 + ½)·cellPx; one guard cell), then the
  // bilinear sample; r is stored as 16 bits over two channels, both filtered linearly, so r interpolates exactly.
  vec2 g = vPos / uCellPx + 0.5;
  vec4 t = texture(uDensity, (g + 0.5) / uTexSize);
  float r = (t.r * 65280.0 + t.g * 255.0) * (uRange / 65535.0);
  float dist = (r - 0.5) * 2.5 * uCellPx;
  // At full size (uPx = 1) the CPU look's cover and 2-px edge line; at half size the same areas, anti-aliased over a
  // drawn pixel: the line keeps its 2 view px of ink.
  float reach = 1.0 + 0.5 * uPx;
  if (dist < -reach) discard;
  float cover = clamp(dist / uPx + 0.5, 0.0, 1.0);
  float edge = clamp((reach - abs(dist)) / uPx, 0.0, 1.0);
  // Liquid colour and depth shade s of the cell grid (SURFACE_SHADING in src/lib/render/looks.ts).
  vec4 tint = texture(uTint, (g + 0.5) / uTintSize);
  vec3 base = tint.rgb;
  float s = tint.a;
  float fillA = cover * (${SURFACE_SHADING.COVER_ALPHA.toFixed(4)} + ${SURFACE_SHADING.DEEP_ALPHA.toFixed(4)} * s);
  float we = edge * 0.95;
  float wf = fillA * (1.0 - we);
  float a = we + wf;
  if (a <= 0.002) discard;
  vec3 fill = (base + (1.0 - base) * ${SURFACE_SHADING.LIFT.toFixed(4)} * (1.0 - s)) * (1.0 - ${SURFACE_SHADING.DARKEN.toFixed(4)} * s);
  vec3 edgeColour = base + (1.0 - base) * ${SURFACE_SHADING.EDGE_LIFT.toFixed(4)};
  finalColor = vec4(we * edgeColour + wf * fill, a);
}`;


/**
 * View pixels per drawn pixel for a view size: 1 up to about 0.64 megapixels, 2 above (1920×1080 → 960×540). The dot
 * canvas and the WebGL canvas are both drawn at that size and scaled up by the browser's compositor: SwiftShader pays
 * per fragment, and for every pixel of a WebGL canvas it hands to the compositor.
 */
export function viewPxPerTexel(width: number, height: number): number {
  return Math.max(1, Math.ceil(Math.sqrt((width * height) / 640_000)));
}

/** Draws one look of a particle frame: a pixi container (the surface) and a canvas over it (dots), view-sized. */
export class GpuLooks {
  /** The WebGL part (surface and spray), for the pixi stage. */
  readonly container = new Container();
  /** The dots' canvas (speed look, spray), for the page above the WebGL canvas (covers the view from its top-left corner). */
  readonly dotCanvasEl: HTMLCanvasElement;
  private readonly dotContext: CanvasRenderingContext2D;
  private dotImage: ImageData | null = null;
  private dotWords = new Uint32Array(0);
  /** Texels painted this frame and last ([x0, y0, x1, y1), empty when x1 ≤ x0): only they are cleared and put. */
  private dirty = [0, 0, 0, 0];
  private lastDirty = [0, 0, 0, 0];
  private readonly speedLut = new Uint32Array(256);
  private sprayXY = new Int32Array(0);
  private readonly cpu: LookRenderer;
  // Surface: a quad over the view, and the density texture (rebuilt when the grid's size changes).
  private readonly surfaceUniforms = new UniformGroup({
    uTexSize: { value: new Float32Array([1, 1]), type: 'vec2<f32>' },
    uTintSize: { value: new Float32Array([1, 1]), type: 'vec2<f32>' },
    uCellPx: { value: 1, type: 'f32' },
    uRange: { value: DENSITY_RANGE, type: 'f32' },
    uPx: { value: 1, type: 'f32' },
  });
  private readonly surfaceShader: Shader;
  private readonly quad: Float32Array;
  private readonly quadBuffer: Buffer;
  private readonly surface: Mesh<Geometry, Shader>;
  private densityBytes = new Uint8Array(0);
  private densitySource: BufferImageSource | null = null;
  private densityKey = '';
  private tintSource: BufferImageSource | null = null;
  private tintBytes = new Uint8Array(0);
  private sprayWhich = new Int32Array(0);
  private diffuseDots = new Int32Array(0);
  /** ImageData (not premultiplied) words of spray and foam dots, by kind. */
  private readonly diffuseColours = [0, 1, 2].map((kind) => {
    const { rgb: [r, g, b], alpha } = diffuseColour(kind);
    return ((Math.round(alpha * 255) << 24) | (b << 16) | (g << 8) | r) >>> 0;
  });
  /** Walls and props, over the liquid: built once per look and view, then props only move (no geometry a frame). */
  private readonly solids = new Container();
  private solidsFor: { look: ClipLook; key: string; pictures: LookOptions['propImages'] } | null = null;
  private propGraphics: Container[] = [];
  private pictureTextures: Texture[] = [];

  constructor(
    readonly width: number,
    readonly height: number,
  ) {
    this.cpu = new LookRenderer(width, height);
    this.dotCanvasEl = document.createElement('canvas');
    this.dotCanvasEl.style.cssText = 'position:absolute;left:0;top:0;display:none;image-rendering:pixelated';
    this.dotContext = this.dotCanvasEl.getContext('2d')!;
    // ImageData is not premultiplied: 0xAABBGGRR words with the ramp colour and the dots' alpha.
    const alpha = Math.round(SPEED_DOT_ALPHA * 255);
    for (let i = 0; i < 256; i++) {
      const [r, g, b] = rampColour(SPEED_RAMP, i / 255);
      this.speedLut[i] = ((alpha << 24) | (Math.round(b) << 16) | (Math.round(g) << 8) | Math.round(r)) >>> 0;
    }

    this.quad = new Float32Array([0, 0, width, 0, width, height, 0, height]);
    this.quadBuffer = new Buffer({ data: this.quad, usage: BufferUsage.VERTEX | BufferUsage.COPY_DST, label: 'liquid surface quad' });
    const surfaceGeometry = new Geometry({
      attributes: { aPosition: { buffer: this.quadBuffer, format: 'float32x2' } },
      indexBuffer: new Uint32Array([0, 1, 2, 0, 2, 3]),
    });
    this.surfaceShader = new Shader({
      glProgram: GlProgram.from({ vertex: SURFACE_VERTEX, fragment: SURFACE_FRAGMENT, name: 'tidemark-liquid-surface' }),
      resources: { surfaceUniforms: this.surfaceUniforms, uDensity: this.ensureDensityTexture(2, 2), uTint: this.ensureTintTexture(new Uint8Array(4), 1, 1) },
    });
    this.surface = new Mesh({ geometry: surfaceGeometry, shader: this.surfaceShader });
    this.surface.visible = false;
    this.container.addChild(this.surface);
    this.container.addChild(this.solids);
  }

  /** Prepares the look's GPU inputs for a frame (the next pixi render draws it). */
  draw(look: RenderLook, frame: ParticleFrame, toView: TankToView, options: LookOptions = {}) {
    this.surface.visible = false;
    this.dotCanvasEl.style.display = 'none';
    this.drawSolids(frame, toView, options);
    if (frame.count === 0) return;
    if (look === 'speed') this.prepareSpeed(frame, toView, options);
    else this.prepareSurface(frame, toView, options);
  }

  /** Walls and props of the clip's look at the frame's poses, as the CPU look draws them (solids.ts). */
  private drawSolids(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const look = options.scene;
    this.solids.visible = !!look;
    if (!look) return;
    const key = `${t.ox},${t.oy},${t.sx},${t.sy}`;
    if (this.solidsFor?.look !== look || this.solidsFor.key !== key || this.solidsFor.pictures !== options.propImages) this.buildSolids(look, t, key, options.propImages);
    // A prop is built in its drawn pose about its drawn centroid: place that centroid at the pose and turn it
    // (view y points down, so a counter-clockwise angle is a negative pixi rotation).
    look.props.forEach((p, k) => {
      const g = this.propGraphics[k];
      const pose = frame.props?.[k];
      g.visible = !!pose;
      if (!pose) return;
      g.position.set(t.ox + pose.x * t.sx, t.oy - pose.y * t.sy);
      g.rotation = (-pose.angle * Math.PI) / 180;
    });
  }

  private buildSolids(look: ClipLook, t: TankToView, key: string, pictures: LookOptions['propImages']) {
    for (const c of this.solids.removeChildren()) c.destroy({ children: true });
    for (const tex of this.pictureTextures) tex.destroy(true);
    this.pictureTextures = [];
    const colour = (c: readonly number[]) => (Math.round(c[0]) << 16) | (Math.round(c[1]) << 8) | Math.round(c[2]);
    const paint = (g: Graphics, s: SolidOutline) => {
      g.poly(Array.from(s.points), true);
      if (s.fill) g.fill({ color: colour(s.fill), alpha: s.fill[3] });
      g.stroke({ width: s.lineWidth, color: colour(s.line), alpha: s.line[3], alignment: 0.5 });
    };
    const walls = new Graphics();
    for (const s of solidOutlines({ ...look, props: [] }, [], t)) paint(walls, s);
    this.solids.addChild(walls);
    this.propGraphics = look.props.map((p, k) => {
      const [cx, cy] = p.centroid;
      const outline = solidOutlines({ ...look, walls: [], props: [p] }, [{ x: cx, y: cy, angle: 0 }], t)[0];
      const picture = pictures?.[k];
      let g: Container;
      if (picture) {
        // The picture over the drawn shape's bounds, masked by the outline (inside only, as the CPU look), then the rim.
        g = new Container();
        const sprite = new Sprite(this.pictureTexture(picture));
        const b = shapeBounds(p.shape);
        sprite.position.set(t.ox + b.minX * t.sx, t.oy - b.maxY * t.sy);
        sprite.width = (b.maxX - b.minX) * t.sx;
        sprite.height = (b.maxY - b.minY) * t.sy;
        const mask = new Graphics().poly(Array.from(outline.points), true).fill({ color: 0xffffff });
        sprite.mask = mask;
        const rim = new Graphics();
        paint(rim, { ...outline, fill: null });
        g.addChild(sprite, mask, rim);
      } else {
        const graphics = new Graphics();
        paint(graphics, outline);
        g = graphics;
      }
      g.pivot.set(t.ox + cx * t.sx, t.oy - cy * t.sy);
      this.solids.addChild(g);
      return g;
    });
    this.solidsFor = { look, key, pictures };
  }

  /** A texture of a prop's picture (straight-alpha RGBA; premultiplied as it is uploaded). */
  private pictureTexture(picture: PropImage): Texture {
    const source = new BufferImageSource({
      resource: new Uint8Array(picture.data.buffer, picture.data.byteOffset, picture.data.byteLength), width: picture.width, height: picture.height,
      format: 'rgba8unorm', alphaMode: 'premultiply-alpha-on-upload', scaleMode: 'linear', addressMode: 'clamp-to-edge', autoGenerateMipmaps: false,
    });
    const texture = new Texture({ source });
    this.pictureTextures.push(texture);
    return texture;
  }

  /**
   * View pixels per texel of the dot canvas: 1 up to about 0.64 megapixels (960×540 and smaller: dots land on the
   * same pixels as in the CPU look), 2 at 1920×1080, so putImageData never moves more than ~2.5 MB a frame.
   */
  private get texelPx(): number {
    return viewPxPerTexel(this.width, this.height);
  }

  /** Sizes the dot canvas for `texelPx` view pixels a texel and clears it; returns its words (0xAABBGGRR). */
  private dotCanvas(texelPx: number): Uint32Array {
    const cw = Math.ceil(this.width / texelPx);
    const ch = Math.ceil(this.height / texelPx);
    if (!this.dotImage || this.dotImage.width !== cw || this.dotImage.height !== ch) {
      this.dotCanvasEl.width = cw;
      this.dotCanvasEl.height = ch;
      this.dotCanvasEl.style.width = `${cw * texelPx}px`;
      this.dotCanvasEl.style.height = `${ch * texelPx}px`;
      this.dotImage = new ImageData(cw, ch);
      this.dotWords = new Uint32Array(this.dotImage.data.buffer);
      this.lastDirty = [0, 0, cw, ch];
    } else {
      // Clear what the last frame painted (a splash covers a part of the view; 1920×1080 has 0.5 M texels to clear).
      const [x0, y0, x1, y1] = this.lastDirty;
      if (x1 > x0) for (let y = y0; y < y1; y++) this.dotWords.fill(0, y * cw + x0, y * cw + x1);
    }
    this.dirty = [cw, ch, 0, 0];
    return this.dotWords;
  }

  /** Paints a square of `side` texels with its top-left texel at (tx, ty), clipped to the canvas. */
  private paintDot(words: Uint32Array, tx: number, ty: number, side: number, colour: number) {
    const { width: cw, height: ch } = this.dotImage!;
    const d = this.dirty;
    if (tx < d[0]) d[0] = Math.max(0, tx);
    if (ty < d[1]) d[1] = Math.max(0, ty);
    if (tx + side > d[2]) d[2] = Math.min(cw, tx + side);
    if (ty + side > d[3]) d[3] = Math.min(ch, ty + side);
    if (side === 1) {
      if (tx >= 0 && ty >= 0 && tx < cw && ty < ch) words[ty * cw + tx] = colour;
      return;
    }
    for (let y = Math.max(0, ty), y1 = Math.min(ch, ty + side); y < y1; y++) {
      for (let x = Math.max(0, tx), x1 = Math.min(cw, tx + side); x < x1; x++) words[y * cw + x] = colour;
    }
  }

  private showDots() {
    // Put the texels painted now or last frame (those were cleared): the rest of the canvas is unchanged.
    const [a0, b0, a1, b1] = this.dirty, [c0, d0, c1, d1] = this.lastDirty;
    const x0 = Math.min(a0, c1 > c0 ? c0 : a0), y0 = Math.min(b0, d1 > d0 ? d0 : b0);
    const x1 = Math.max(a1, c1), y1 = Math.max(b1, d1);
    if (x1 > x0 && y1 > y0) this.dotContext.putImageData(this.dotImage!, 0, 0, x0, y0, x1 - x0, y1 - y0);
    this.lastDirty = a1 > a0 && b1 > b0 ? this.dirty : [0, 0, 0, 0];
    this.dotCanvasEl.style.display = 'block';
  }

  private prepareSpeed(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const { dot, perMetrePerSecond } = this.cpu.speedDots(frame, t, options);
    const texel = this.texelPx;
    const words = this.dotCanvas(texel);
    const side = Math.max(1, Math.round(dot / texel));
    // The dot's top-left pixel as the CPU look rounds it; later particles cover earlier ones.
    const half = (dot - 1) / 2;
    const toLut = 255 * perMetrePerSecond;
    const lut = this.speedLut;
    const { ox, oy, sx, sy } = t;
    const { x, y, speed, count } = frame;
    for (let i = 0; i < count; i++) {
      const tx = Math.floor(Math.round(ox + x[i] * sx - half) / texel);
      const ty = Math.floor(Math.round(oy - y[i] * sy - half) / texel);
      let s = (speed[i] * toLut) | 0;
      if (s > 255) s = 255;
      this.paintDot(words, tx, ty, side, lut[s]);
    }
    this.showDots();
  }

  private ensureDensityTexture(width: number, height: number): BufferImageSource {
    const key = `${width}×${height}`;
    if (this.densitySource && key === this.densityKey) return this.densitySource;
    const old = this.densitySource;
    this.densityKey = key;
    this.densityBytes = new Uint8Array(width * height * 2);
    this.densitySource = new BufferImageSource({
      resource: this.densityBytes,
      width,
      height,
      format: 'rg8unorm',
      alphaMode: 'no-premultiply-alpha',
      scaleMode: 'linear',
      addressMode: 'clamp-to-edge',
      autoGenerateMipmaps: false,
    });
    if (this.surfaceShader) this.surfaceShader.resources.uDensity = this.densitySource;
    old?.destroy();
    return this.densitySource;
  }

  /** The per-cell colour and shade texture (RGBA8, gw × gh), rebuilt when the grid's size changes. */
  private ensureTintTexture(bytes: Uint8Array, width: number, height: number): BufferImageSource {
    const src = this.tintSource;
    if (src && src.width === width && src.height === height) return src;
    this.tintBytes = new Uint8Array(width * height * 4);
    this.tintBytes.set(bytes.subarray(0, this.tintBytes.length));
    this.tintSource = new BufferImageSource({
      resource: this.tintBytes, width, height, format: 'rgba8unorm', alphaMode: 'no-premultiply-alpha',
      scaleMode: 'linear', addressMode: 'clamp-to-edge', autoGenerateMipmaps: false,
    });
    if (this.surfaceShader) this.surfaceShader.resources.uTint = this.tintSource;
    src?.destroy();
    return this.tintSource;
  }

  private prepareSurface(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const field = this.cpu.densityField(frame, t, options);
    const { gw, gh, ratio, cellPx } = field;
    const tint = this.ensureTintTexture(field.tint, gw, gh);
    this.tintBytes.set(field.tint.subarray(0, this.tintBytes.length));
    tint.update();
    // Rows of whole 4-byte words (WebGL's default unpack alignment): an even number of two-byte texels.
    const texWidth = gw + (gw & 1);
    const source = this.ensureDensityTexture(texWidth, gh);
    const bytes = this.densityBytes;
    const toWord = 65535 / DENSITY_RANGE;
    // The shader discards pixels with r < ½ − (1 + ½·uPx)/(2.5·cellPx); only cells at or above that level can colour a pixel,
    // so the quad covers just their bounding box (software GL pays for every fragment of a full-view quad).
    const low = 0.5 - (1 + 0.5 * this.texelPx) / (2.5 * cellPx);
    let iMin = gw, iMax = -1, jMin = gh, jMax = -1;
    for (let j = 0; j < gh; j++) {
      let p = j * texWidth * 2;
      for (let k = j * gw, end = k + gw; k < end; k++, p += 2) {
        const r = ratio[k];
        if (r >= low) {
          const i = k - j * gw;
          if (i < iMin) iMin = i;
          if (i > iMax) iMax = i;
          if (j < jMin) jMin = j;
          if (j > jMax) jMax = j;
        }
        let v = r * toWord + 0.5;
        v = v < 0 ? 0 : v > 65535 ? 65535 : v | 0;
        bytes[p] = v >> 8;
        bytes[p + 1] = v & 255;
      }
    }
    source.update();
    if (iMax >= 0) {
      // Cell i (guard cell 0) is centred on pixel (i − ½)·cellPx and reaches a cell further by bilinear sampling.
      const x0 = Math.max(0, Math.floor((iMin - 1.5) * cellPx));
      const x1 = Math.min(this.width, Math.ceil((iMax + 0.5) * cellPx));
      const y0 = Math.max(0, Math.floor((jMin - 1.5) * cellPx));
      const y1 = Math.min(this.height, Math.ceil((jMax + 0.5) * cellPx));
      this.quad.set([x0, y0, x1, y0, x1, y1, x0, y1]);
      this.quadBuffer.update();
    }
    const u = this.surfaceUniforms.uniforms;
    (u.uTexSize as Float32Array)[0] = texWidth;
    (u.uTexSize as Float32Array)[1] = gh;
    (u.uTintSize as Float32Array)[0] = gw;
    (u.uTintSize as Float32Array)[1] = gh;
    u.uCellPx = cellPx;
    u.uPx = this.texelPx;
    this.surfaceUniforms.update();
    this.surface.visible = iMax >= 0;

    // Spray droplets, in their liquid's edge colour, on the dot canvas too (as GL points they cost SwiftShader several ms).
    if (this.sprayXY.length < 2 * frame.count) {
      this.sprayXY = new Int32Array(2 * frame.count);
      this.sprayWhich = new Int32Array(frame.count);
    }
    const n = this.cpu.sprayDroplets(frame, t, this.sprayXY, this.sprayWhich);
    const texel = this.texelPx;
    const words = this.dotCanvas(texel);
    const side = Math.max(1, Math.round(LookRenderer.sprayDot(cellPx) / texel));
    // ImageData is not premultiplied: 0xAABBGGRR words.
    const sprayWords = liquidColours(options).map((c) => {
      const [r, g, b] = lifted(c, SURFACE_SHADING.EDGE_LIFT).map(Math.round);
      return ((Math.round(SPRAY_ALPHA * 255) << 24) | (b << 16) | (g << 8) | r) >>> 0;
    });
    const liquid = frame.liquid;
    for (let k = 0; k < n; k++) {
      const spray = sprayWords[liquid ? Math.min(liquid[this.sprayWhich[k]], sprayWords.length - 1) : 0];
      this.paintDot(words, Math.floor(this.sprayXY[2 * k] / texel), Math.floor(this.sprayXY[2 * k + 1] / texel), side, spray);
    }
    // Foam, spray and bubbles of the bake (the CPU look's DIFFUSE_LOOK), over the droplets.
    const dn = frame.diffuse?.count ?? 0;
    if (dn > 0) {
      if (this.diffuseDots.length < 4 * dn) this.diffuseDots = new Int32Array(4 * dn);
      const m = this.cpu.diffuseDots(frame, t, this.diffuseDots);
      const dd = this.diffuseDots;
      for (let k = 0; k < m; k++) {
        const sideT = Math.max(1, Math.round(dd[4 * k + 2] / texel));
        this.paintDot(words, Math.floor(dd[4 * k] / texel), Math.floor(dd[4 * k + 1] / texel), sideT, this.diffuseColours[dd[4 * k + 3]]);
      }
    }
    this.showDots();
  }

  destroy() {
    this.dotCanvasEl.remove();
    this.container.destroy({ children: true });
    this.densitySource?.destroy();
    this.tintSource?.destroy();
    for (const tex of this.pictureTextures) tex.destroy(true);
  }
}
