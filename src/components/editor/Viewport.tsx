// The editor's view: the shot's plate (a DOM image or video behind a transparent canvas, placed by the camera), and a
// pixi.js canvas drawing the metres grid, the tank, the scene's items, the selection's handles, the active tool's
// guides and the live preview's particles (one image a frame, never a sprite per particle). Pointer input goes to the
// active tool in tank metres; wheel zooms, middle button or Space-drag pans. Pixi only draws: all state is elsewhere.
import { useEffect, useRef, useState } from 'react';
// Pixi's shader code without eval, so the page's Content-Security-Policy needs no 'unsafe-eval'.
import 'pixi.js/unsafe-eval';
import { Application, BufferImageSource, Container, Graphics, Sprite, Text, Texture } from 'pixi.js';
import type { EditorStore } from '~/lib/editor/store';
import type { PreviewController } from './preview-controller';
import { allItems, findItem, type AnyItem } from '~/lib/editor/document';
import { handlesOf, propOutlineAt, shapeOutline, SPOUT_ARM_PER_SPEED, type Vec } from '~/lib/editor/geometry';
import { fitBox, gridSteps, toScreen, toWorld, zoomAt, type Camera } from '~/lib/editor/camera';
import { shapeBounds, shapeCentroid } from '~/lib/scene/shapes';
import { LookRenderer, type RenderLook } from '~/lib/render/looks';
import type { Overlay } from '~/lib/editor/tools';
import { shownPoseInto } from '~/lib/scene/pose';
import type { PropImage } from '~/lib/render/solids';
import type { PictureShelf } from './picture-shelf';

export interface ViewControls { fit(): void; toClient(x: number, y: number): Vec }

export interface PlateInfo { url: string; contentType: string; width: number; height: number; metresPerPixel: number }

interface Props {
  store: EditorStore;
  preview: PreviewController;
  /** The studio's prop pictures: a prop that names one is drawn as it, at its pose. */
  pictures?: PictureShelf;
  plate: PlateInfo | null;
  /** First frame of the plate (the shot's first frame). */
  plateFirstFrame: number;
  look: RenderLook;
  showPreview: boolean;
  /** Receives the view's controls: fit (Home) and where a tank point is on the page (for tests and tooltips). */
  viewRef: { current: ViewControls | null };
  onCursor(p: Vec | null): void;
}

const COLOURS = {
  pours: 0x3fb8c9, spouts: 0x7fe3f0, walls: 0xb9ab8f, props: 0xe0583d, drains: 0x1b1b1b,
  tank: 0xf4f1ea, grid: 0xffffff, handle: 0xffffff, accent: 0x0d7a78, guide: 0xfffdf8,
} as const;

export function Viewport({ store, preview, pictures, plate, plateFirstFrame, look, showPreview, viewRef, onCursor }: Props) {
  const hostRef = useRef<HTMLDivElement>(null);
  const plateRef = useRef<HTMLImageElement & HTMLVideoElement>(null);
  const [failed, setFailed] = useState<string | null>(null);
  const live = useRef({ look, showPreview, plate });
  live.current = { look, showPreview, plate };

  useEffect(() => {
    const host = hostRef.current!;
    let disposed = false;
    const app = new Application();
    let camera: Camera = { ox: 40, oy: 400, scale: 300 };
    let scheduled = 0;
    let renderer: LookRenderer | null = null;
    let particleSource: BufferImageSource | null = null;
    const cleanups: (() => void)[] = [];

    const world = new Container();
    const grid = new Graphics();
    const scene = new Graphics();
    const particles = new Sprite();
    const items = new Graphics();
    const guides = new Graphics();
    const labels = new Container();
    // Props drawn as their picture: one masked sprite each, under the items' outlines.
    const propPictures = new Container();
    world.addChild(grid, scene, particles, propPictures, items, guides, labels);
    const pictureSprites = new Map<string, { box: Container; sprite: Sprite; mask: Graphics }>();
    const pictureTextures = new Map<PropImage, Texture>();
    const textureOf = (img: PropImage) => {
      let t = pictureTextures.get(img);
      if (!t) {
        const source = new BufferImageSource({
          resource: new Uint8Array(img.data.buffer, img.data.byteOffset, img.data.byteLength), width: img.width, height: img.height,
          format: 'rgba8unorm', alphaMode: 'premultiply-alpha-on-upload', scaleMode: 'linear', addressMode: 'clamp-to-edge', autoGenerateMipmaps: false,
        });
        pictureTextures.set(img, (t = new Texture({ source })));
      }
      return t;
    };
    const pose = { dx: 0, dy: 0, angle: 0 };
    /**
     * Draws the prop as its picture at the pose shown at `frame` (as the player does, src/lib/render/solids.ts): the
     * picture over the drawn shape's bounds, masked by the drawn outline, turned about the drawn centroid and moved
     * by the pose. Returns false while the picture is not decoded yet (the prop is then filled as usual).
     */
    function drawPicture(item: Extract<AnyItem, { keys: unknown }>, frame: number, solved: Parameters<typeof shownPoseInto>[2]): boolean {
      const img = item.picture !== undefined && pictures ? pictures.imageOf(item.picture) : null;
      if (!img) return false;
      let entry = pictureSprites.get(item.id);
      if (!entry) {
        const box = new Container(), sprite = new Sprite(), mask = new Graphics();
        sprite.mask = mask;
        box.addChild(sprite, mask);
        propPictures.addChild(box);
        pictureSprites.set(item.id, (entry = { box, sprite, mask }));
      }
      const texture = textureOf(img);
      if (entry.sprite.texture !== texture) entry.sprite.texture = texture;
      const b = shapeBounds(item.shape);
      const [bx, by] = toScreen(camera, b.minX, b.maxY);
      entry.sprite.position.set(bx, by);
      entry.sprite.width = (b.maxX - b.minX) * camera.scale;
      entry.sprite.height = (b.maxY - b.minY) * camera.scale;
      entry.mask.clear().poly(shapeOutline(item.shape).flatMap((p) => toScreen(camera, p[0], p[1]))).fill({ color: 0xffffff });
      shownPoseInto(item, frame, solved, pose);
      const c = shapeCentroid(item.shape);
      const [px, py] = toScreen(camera, c[0], c[1]);
      const [qx, qy] = toScreen(camera, c[0] + pose.dx, c[1] + pose.dy);
      entry.box.pivot.set(px, py);
      entry.box.position.set(qx, qy);
      entry.box.rotation = (-pose.angle * Math.PI) / 180; // view y points down: counter-clockwise is negative
      entry.box.visible = true;
      return true;
    }
    const labelPool: Text[] = [];
    const labelColours: number[] = [];

    const size = () => ({ w: Math.max(1, host.clientWidth), h: Math.max(1, host.clientHeight) });

    const plateBox = () => {
      const p = live.current.plate;
      if (!p) return null;
      return { minX: 0, minY: 0, maxX: p.width * p.metresPerPixel, maxY: p.height * p.metresPerPixel };
    };
    const fit = () => {
      const { w, h } = size();
      const t = store.doc.tank;
      const pb = plateBox();
      const box = { minX: 0, minY: 0, maxX: Math.max(t.width, pb?.maxX ?? 0), maxY: Math.max(t.height, pb?.maxY ?? 0) };
      camera = fitBox(w, h, box, 28);
      schedule();
    };
    viewRef.current = {
      fit,
      toClient(x, y) { const r = host.getBoundingClientRect(); const [sx, sy] = toScreen(camera, x, y); return [r.left + sx, r.top + sy]; },
    };

    function schedule() {
      if (!scheduled && !disposed) scheduled = requestAnimationFrame(draw);
    }

    function label(i: number, text: string, x: number, y: number, colour = 0xffffff, size = 10) {
      let t = labelPool[i];
      if (!t) {
        t = new Text({ text, style: { fontFamily: 'Space Grotesk, sans-serif', fontSize: size, fill: colour } });
        labelPool[i] = t;
        labelColours[i] = colour;
        labels.addChild(t);
      }
      if (t.text !== text) t.text = text;
      if (labelColours[i] !== colour) { t.style.fill = colour; labelColours[i] = colour; }
      t.visible = true;
      t.position.set(Math.round(x), Math.round(y));
    }

    function placePlate() {
      const el = plateRef.current, p = live.current.plate;
      if (!el || !p) return;
      const [x0, y0] = toScreen(camera, 0, p.height * p.metresPerPixel);
      el.style.left = `${x0}px`;
      el.style.top = `${y0}px`;
      el.style.width = `${p.width * p.metresPerPixel * camera.scale}px`;
      el.style.height = `${p.height * p.metresPerPixel * camera.scale}px`;
    }

    function draw() {
      scheduled = 0;
      if (disposed) return;
      const snap = store.snapshot;
      const doc = snap.shown;
      const { w, h } = size();
      store.pixel = 1 / camera.scale;
      const steps = gridSteps(camera.scale);
      store.gridStep = steps.minor;
      placePlate();
      let labelCount = 0;

      // Metres grid (minor faint, major brighter and labelled).
      grid.clear();
      const [wx0, wy1] = toWorld(camera, 0, 0);
      const [wx1, wy0] = toWorld(camera, w, h);
      for (const [step, alpha] of [[steps.minor, 0.07], [steps.major, 0.18]] as const) {
        for (let x = Math.ceil(wx0 / step) * step; x <= wx1; x += step) {
          const sx = Math.round(camera.ox + x * camera.scale) + 0.5;
          grid.moveTo(sx, 0).lineTo(sx, h);
        }
        for (let y = Math.ceil(wy0 / step) * step; y <= wy1; y += step) {
          const sy = Math.round(camera.oy - y * camera.scale) + 0.5;
          grid.moveTo(0, sy).lineTo(w, sy);
        }
        grid.stroke({ width: 1, color: COLOURS.grid, alpha });
      }
      const fmt = (v: number) => `${+v.toFixed(3)} m`;
      for (let x = Math.ceil(wx0 / steps.major) * steps.major; x <= wx1 && labelCount < 30; x += steps.major) {
        label(labelCount++, fmt(x), camera.ox + x * camera.scale + 3, h - 14, 0xdfe9ec);
      }
      for (let y = Math.ceil(wy0 / steps.major) * steps.major; y <= wy1 && labelCount < 60; y += steps.major) {
        label(labelCount++, fmt(y), 3, camera.oy - y * camera.scale - 13, 0xdfe9ec);
      }

      // Tank: solid sides thick, open sides dashed; cells shown when they are large enough on screen.
      scene.clear();
      const t = doc.tank;
      const [tx0, ty1] = toScreen(camera, 0, t.height);
      const [tx1, ty0] = toScreen(camera, t.width, 0);
      scene.rect(tx0, ty1, tx1 - tx0, ty0 - ty1).fill({ color: 0x0c1c22, alpha: live.current.plate ? 0.12 : 0.35 });
      const cellPx = t.cellSize * camera.scale;
      if (cellPx >= 7) {
        for (let x = t.cellSize; x < t.width - 1e-9; x += t.cellSize) { const sx = camera.ox + x * camera.scale; scene.moveTo(sx, ty1).lineTo(sx, ty0); }
        for (let y = t.cellSize; y < t.height - 1e-9; y += t.cellSize) { const sy = camera.oy - y * camera.scale; scene.moveTo(tx0, sy).lineTo(tx1, sy); }
        scene.stroke({ width: 1, color: COLOURS.tank, alpha: 0.06 });
      }
      const side = (a: Vec, b: Vec, solid: boolean) => {
        if (solid) { scene.moveTo(a[0], a[1]).lineTo(b[0], b[1]).stroke({ width: 3, color: COLOURS.tank, alpha: 0.9 }); return; }
        const len = Math.hypot(b[0] - a[0], b[1] - a[1]), n = Math.max(1, Math.floor(len / 10));
        for (let k = 0; k < n; k += 2) {
          const s0 = k / n, s1 = Math.min(1, (k + 1) / n);
          scene.moveTo(a[0] + (b[0] - a[0]) * s0, a[1] + (b[1] - a[1]) * s0).lineTo(a[0] + (b[0] - a[0]) * s1, a[1] + (b[1] - a[1]) * s1);
        }
        scene.stroke({ width: 1.5, color: COLOURS.tank, alpha: 0.7 });
      };
      side([tx0, ty0], [tx1, ty0], t.sides.bottom);
      side([tx0, ty1], [tx1, ty1], t.sides.top);
      side([tx0, ty0], [tx0, ty1], t.sides.left);
      side([tx1, ty0], [tx1, ty1], t.sides.right);
      label(labelCount++, `Tank ${+t.width.toFixed(4)} × ${+t.height.toFixed(4)} m`, tx0 + 4, ty1 + 4, 0xf4f1ea, 11);

      // Particles of the preview at the current frame.
      const pf = live.current.showPreview && preview.snapshot.status !== 'off' ? preview.frameAt(snap.frame) : null;
      if (pf) {
        if (!renderer || renderer.image.width !== w || renderer.image.height !== h) {
          renderer = new LookRenderer(w, h);
          particleSource?.destroy();
          particleSource = new BufferImageSource({ resource: renderer.image.data, width: w, height: h, format: 'rgba8unorm', alphaMode: 'premultiplied-alpha' });
          particles.texture = new Texture({ source: particleSource });
        }
        // Each liquid in its colour (the view draws walls and props itself, in its own way, below).
        const liquidsLook = { liquids: doc.liquids.map((l) => ({ id: l.id, colour: l.colour })), walls: [], wallStyle: 'hidden' as const, props: [] };
        renderer.render(live.current.look, { count: pf.count, x: pf.x, y: pf.y, speed: pf.speed, liquid: pf.liquid, maxSpeed: Math.max(pf.stats.maxSpeed, 0.5) },
          { ox: camera.ox, oy: camera.oy, sx: camera.scale, sy: camera.scale }, { restDensity: preview.snapshot.restDensity || undefined, scene: liquidsLook });
        particleSource!.update();
        particles.visible = true;
      } else particles.visible = false;

      // Items.
      items.clear();
      for (const e of pictureSprites.values()) e.box.visible = false;
      const poly = (pts: Vec[]) => pts.flatMap((p) => toScreen(camera, p[0], p[1]));
      const liquidColour = new Map(doc.liquids.map((l) => [l.id, parseInt(l.colour.slice(1), 16)]));
      for (const { ref, item } of allItems(doc)) {
        // standing liquid and spouts in their liquid's colour
        const colour = ('liquid' in item && liquidColour.get(item.liquid)) || COLOURS[ref.group];
        const fillAlpha = { pours: 0.3, spouts: 0.45, walls: 0.75, props: 0.55, drains: 0.55 }[ref.group] * (pf && (ref.group === 'pours' || ref.group === 'spouts') ? 0.25 : 1);
        if (ref.group === 'props' && 'keys' in item) {
          items.poly(poly(shapeOutline(item.shape))).stroke({ width: 1, color: colour, alpha: 0.35 }); // drawn pose
          const c = shapeCentroid(item.shape);
          const path = item.keys.map((k) => toScreen(camera, c[0] + k.dx, c[1] + k.dy));
          if (path.length > 1) { items.moveTo(path[0][0], path[0][1]); for (const p of path.slice(1)) items.lineTo(p[0], p[1]); items.stroke({ width: 1.5, color: colour, alpha: 0.8 }); }
          for (const p of path) items.circle(p[0], p[1], 2.5).fill({ color: colour });
          // A free prop stands where the preview solved it at this frame (keyed props: where their keys put them);
          // a prop with a picture is drawn as it there, with its outline over it.
          const pictured = drawPicture(item, snap.frame, pf?.props ?? null);
          const outline = items.poly(poly(propOutlineAt(item, snap.frame, pf?.props ?? null)));
          (pictured ? outline : outline.fill({ color: colour, alpha: fillAlpha })).stroke({ width: 1.5, color: colour });
        } else {
          const active = !('startFrame' in item) || (snap.frame >= item.startFrame && snap.frame <= item.endFrame);
          items.poly(poly(shapeOutline(item.shape))).fill({ color: colour, alpha: fillAlpha * (active ? 1 : 0.4) }).stroke({ width: ref.group === 'drains' ? 2 : 1.5, color: ref.group === 'drains' ? 0xe0583d : colour, alpha: active ? 1 : 0.5 });
          if ('startFrame' in item && 'velocity' in item) arrow(items, camera, shapeCentroid(item.shape), item.velocity, colour);
        }
        const b = shapeBounds(item.shape);
        const [lx, ly] = toScreen(camera, b.minX, b.maxY);
        if (labelCount < 120) label(labelCount++, item.id, lx, ly - 13, 0xfffdf8, 10);
      }

      // Selection.
      guides.clear();
      for (const ref of snap.selection) {
        const item = findItem(doc, ref);
        if (!item) continue;
        const b = shapeBounds(item.shape);
        const [x0, y1] = toScreen(camera, b.minX, b.maxY), [x1, y0] = toScreen(camera, b.maxX, b.minY);
        guides.rect(x0 - 2, y1 - 2, x1 - x0 + 4, y0 - y1 + 4).stroke({ width: 1, color: COLOURS.handle, alpha: 0.9 });
        if (snap.selection.length === 1) drawHandles(guides, camera, item, snap.frame);
      }
      drawOverlay(guides, camera, snap.overlay);
      for (let i = labelCount; i < labelPool.length; i++) labelPool[i].visible = false;
      app.renderer.render(app.stage);
    }

    // Input: pointer to the active tool in metres; pan with the middle button or Space + drag; wheel zooms.
    let spaceHeld = false;
    let panning: { x: number; y: number; cam: Camera } | null = null;
    let lastDown = { t: 0, x: 0, y: 0 };
    const local = (e: PointerEvent | WheelEvent) => { const r = host.getBoundingClientRect(); return [e.clientX - r.left, e.clientY - r.top] as Vec; };
    const pointer = (e: PointerEvent, detail = 1) => {
      const [sx, sy] = local(e);
      const [x, y] = toWorld(camera, sx, sy);
      return { x, y, shift: e.shiftKey, alt: e.altKey, detail };
    };
    const onDown = (e: PointerEvent) => {
      host.focus({ preventScroll: true });
      const [sx, sy] = local(e);
      if (e.button === 1 || (e.button === 0 && spaceHeld)) {
        e.preventDefault();
        panning = { x: sx, y: sy, cam: camera };
        host.setPointerCapture(e.pointerId);
        host.style.cursor = 'grabbing';
        return;
      }
      if (e.button !== 0) return;
      host.setPointerCapture(e.pointerId);
      const now = performance.now();
      const detail = now - lastDown.t < 400 && Math.hypot(sx - lastDown.x, sy - lastDown.y) < 6 ? 2 : 1;
      lastDown = { t: now, x: sx, y: sy };
      store.pointerDown(pointer(e, detail));
    };
    const onMove = (e: PointerEvent) => {
      const [sx, sy] = local(e);
      if (panning) {
        camera = { ...panning.cam, ox: panning.cam.ox + sx - panning.x, oy: panning.cam.oy + sy - panning.y };
        schedule();
        return;
      }
      const p = pointer(e);
      onCursor([p.x, p.y]);
      store.pointerMove(p);
    };
    const onUp = (e: PointerEvent) => {
      if (panning) { panning = null; host.style.cursor = ''; return; }
      if (e.button !== 0) return;
      store.pointerUp(pointer(e));
    };
    const onWheel = (e: WheelEvent) => {
      e.preventDefault();
      const [sx, sy] = local(e);
      camera = zoomAt(camera, sx, sy, Math.exp(-e.deltaY * 0.0015));
      schedule();
    };
    const onKey = (e: KeyboardEvent) => {
      if (e.code !== 'Space') return;
      const typing = e.target instanceof HTMLElement && /^(INPUT|TEXTAREA|SELECT|BUTTON)$/.test(e.target.tagName);
      if (typing) return;
      spaceHeld = e.type === 'keydown';
      host.style.cursor = spaceHeld ? 'grab' : '';
      e.preventDefault();
    };
    host.addEventListener('pointerdown', onDown);
    host.addEventListener('pointermove', onMove);
    host.addEventListener('pointerup', onUp);
    host.addEventListener('pointerleave', () => onCursor(null));
    host.addEventListener('wheel', onWheel, { passive: false });
    host.addEventListener('auxclick', (e) => e.preventDefault());
    window.addEventListener('keydown', onKey);
    window.addEventListener('keyup', onKey);
    cleanups.push(() => { window.removeEventListener('keydown', onKey); window.removeEventListener('keyup', onKey); });

    void (async () => {
      try {
        // Software WebGL on Chromium without a GPU: ask for WebGL (WebGPU finds no adapter there). PITFALLS.md.
        await app.init({ preference: 'webgl', backgroundAlpha: 0, antialias: true, autoStart: false, width: size().w, height: size().h, resolution: 1 });
      } catch (err) {
        setFailed((err as Error).message || 'WebGL is not available in this browser');
        return;
      }
      if (disposed) { app.destroy(true); return; }
      app.canvas.style.position = 'absolute';
      app.canvas.style.inset = '0';
      app.canvas.setAttribute('data-testid', 'editor-canvas');
      host.appendChild(app.canvas);
      app.stage.addChild(world);
      fit();
      const ro = new ResizeObserver(() => { const { w, h } = size(); app.renderer.resize(w, h); schedule(); });
      ro.observe(host);
      cleanups.push(() => ro.disconnect());
      cleanups.push(store.subscribe(schedule));
      cleanups.push(preview.subscribe(schedule));
      if (pictures) cleanups.push(pictures.subscribe(schedule));
      schedule();
    })();

    return () => {
      disposed = true;
      cancelAnimationFrame(scheduled);
      for (const c of cleanups) c();
      for (const t of pictureTextures.values()) t.destroy(true);
      viewRef.current = null;
      try { app.destroy(true, { children: true }); } catch { /* not initialised yet */ }
    };
  }, [store, preview, pictures, viewRef, onCursor]);

  // Redraw on look changes; move the plate video to the current frame.
  useEffect(() => {
    const el = plateRef.current;
    const unsub = store.subscribe(() => {
      if (el && plate?.contentType.startsWith('video/')) {
        const t = (store.snapshot.frame - plateFirstFrame) / store.doc.timing.fps;
        if (Math.abs(el.currentTime - t) > 0.001) el.currentTime = Math.max(0, t);
      }
    });
    return unsub;
  }, [store, plate, plateFirstFrame]);

  return (
    <div className="relative h-full w-full overflow-hidden bg-[#16262d]">
      {plate &&
        (plate.contentType.startsWith('video/') ? (
          <video ref={plateRef} src={plate.url} muted playsInline preload="auto" className="pointer-events-none absolute max-w-none select-none" aria-label="Plate" />
        ) : (
          <img ref={plateRef} src={plate.url} alt="Plate" draggable={false} className="pointer-events-none absolute max-w-none select-none" />
        ))}
      <div ref={hostRef} tabIndex={0} className="absolute inset-0 outline-none" aria-label="Scene view: draw with the active tool, wheel to zoom, Space-drag to pan" data-testid="editor-view" />
      {failed && <p className="absolute inset-x-0 top-1/2 text-center text-sm text-coral-100">The view could not start: {failed}</p>}
    </div>
  );
}

function arrow(g: Graphics, cam: Camera, from: Vec, v: readonly number[], colour: number) {
  const [x0, y0] = toScreen(cam, from[0], from[1]);
  const [x1, y1] = toScreen(cam, from[0] + v[0] * SPOUT_ARM_PER_SPEED, from[1] + v[1] * SPOUT_ARM_PER_SPEED);
  const a = Math.atan2(y1 - y0, x1 - x0);
  g.moveTo(x0, y0).lineTo(x1, y1)
    .moveTo(x1, y1).lineTo(x1 - 8 * Math.cos(a - 0.45), y1 - 8 * Math.sin(a - 0.45))
    .moveTo(x1, y1).lineTo(x1 - 8 * Math.cos(a + 0.45), y1 - 8 * Math.sin(a + 0.45))
    .stroke({ width: 2, color: colour });
}

/** The selection's handles; the key at the current frame (the one a drag takes where diamonds overlap) is drawn last and larger. */
function drawHandles(g: Graphics, cam: Camera, item: AnyItem, frame: number) {
  const hs = handlesOf(item, 1 / cam.scale);
  const current = hs.find((h) => h.kind === 'key' && h.frame === frame);
  for (const h of hs) {
    if (h === current) continue;
    const [x, y] = toScreen(cam, h.x, h.y);
    if (h.kind === 'corner') g.rect(x - 4, y - 4, 8, 8).fill({ color: COLOURS.handle }).stroke({ width: 1.5, color: COLOURS.accent });
    else if (h.kind === 'rotate') g.circle(x, y, 5).fill({ color: COLOURS.accent }).stroke({ width: 1.5, color: COLOURS.handle });
    else if (h.kind === 'key') g.poly([x, y - 6, x + 6, y, x, y + 6, x - 6, y]).fill({ color: 0xfad5cb }).stroke({ width: 1.5, color: 0x9e3521 });
    else g.circle(x, y, 6).fill({ color: 0x7fe3f0 }).stroke({ width: 1.5, color: 0x053534 });
  }
  if (current) {
    const [x, y] = toScreen(cam, current.x, current.y);
    g.poly([x, y - 8, x + 8, y, x, y + 8, x - 8, y]).fill({ color: 0xe0583d }).stroke({ width: 2, color: 0xffffff });
  }
}

function drawOverlay(g: Graphics, cam: Camera, o: Overlay | null) {
  if (!o) return;
  const s = (p: readonly number[]) => toScreen(cam, p[0], p[1]);
  if (o.kind === 'shape') {
    g.poly(shapeOutline(o.shape).flatMap((p) => s(p))).fill({ color: COLOURS.guide, alpha: 0.12 }).stroke({ width: 1.5, color: COLOURS.guide });
  } else if (o.kind === 'polyline') {
    const pts = o.points.map(s);
    if (pts.length) {
      g.moveTo(pts[0][0], pts[0][1]);
      for (const p of pts.slice(1)) g.lineTo(p[0], p[1]);
      if (o.cursor) { const c = s(o.cursor); g.lineTo(c[0], c[1]); }
      g.stroke({ width: 1.5, color: COLOURS.guide });
      for (const p of pts) g.circle(p[0], p[1], 3).fill({ color: COLOURS.guide });
      g.circle(pts[0][0], pts[0][1], 7).stroke({ width: 1, color: COLOURS.guide, alpha: 0.8 });
    }
  } else if (o.kind === 'band') {
    const [x0, y1] = s([o.box.minX, o.box.maxY]), [x1, y0] = s([o.box.maxX, o.box.minY]);
    g.rect(x0, y1, x1 - x0, y0 - y1).fill({ color: COLOURS.guide, alpha: 0.08 }).stroke({ width: 1, color: COLOURS.guide });
  } else if (o.kind === 'brush' || o.kind === 'cursor') {
    if (o.kind === 'brush') {
      const { mask, metresPerPixel: m } = o;
      for (let j = 0; j < mask.height; j++) {
        let i = 0;
        while (i < mask.width) {
          if (!mask.data[j * mask.width + i]) { i++; continue; }
          const start = i;
          while (i < mask.width && mask.data[j * mask.width + i]) i++;
          const [x0, y0] = s([start * m, (mask.height - j) * m]);
          g.rect(x0, y0, (i - start) * m * cam.scale, m * cam.scale + 0.5);
        }
      }
      g.fill({ color: COLOURS.pours, alpha: 0.45 });
    }
    const c = s(o.kind === 'brush' ? o.cursor : o.at);
    g.circle(c[0], c[1], o.radius * cam.scale).stroke({ width: 1, color: COLOURS.guide });
  }
}

