// The plate under the player, the share page, compare and exports: the picture of a shot frame, from a still image or
// a video read with an HTML <video> seeked to the frame's time, (frame − the plate's first frame)/fps, and copied into
// a canvas. Browser only; free of React.

export type PlateImage = HTMLImageElement | HTMLCanvasElement;

export interface PlateFrameSource {
  readonly kind: 'still' | 'video';
  /** The plate's size in pixels. */
  readonly width: number;
  readonly height: number;
  /**
   * Resolves to the picture of a shot frame. A still returns the same image for every frame; a video returns its
   * one canvas, redrawn (a newer call supersedes an older one that has not started seeking yet).
   */
  frameAt(shotFrame: number): Promise<PlateImage>;
  destroy(): void;
}

/** Where a plate sits on the shot's frames: the cut in and, for a plate delivered with handles, the plate's first frame. */
export interface PlatePlacement {
  /** Shot frame number of the cut in. */
  firstFrame: number;
  /** Shot frame number of the plate's first picture; null or absent: the cut in. */
  plateFirstFrame?: number | null;
}

/** Returns the shot frame number shown by the plate's first picture: its first frame when set, else the cut in. */
export function plateStartFrame(shot: PlatePlacement): number {
  return shot.plateFirstFrame ?? shot.firstFrame;
}

export interface PlateOpenOptions {
  url: string;
  contentType: string;
  /** Where the plate's first picture falls on the shot's frames (a video is seeked by it). */
  shot: PlatePlacement;
  /** Real frames per second of the shot (30000/1001 for 29.97). */
  fps: number;
}

export function isVideoPlate(contentType: string): boolean {
  return contentType.startsWith('video/');
}

/** Opens a plate: resolves once its size is known and its first picture can be drawn. */
export function openPlate(o: PlateOpenOptions): Promise<PlateFrameSource> {
  return isVideoPlate(o.contentType) ? openVideoPlate(o) : openStillPlate(o.url);
}

async function openStillPlate(url: string): Promise<PlateFrameSource> {
  const img = new Image();
  img.crossOrigin = 'anonymous'; // the presigned URL is another origin; WebGL needs an untainted image
  img.decoding = 'async';
  img.src = url;
  await img.decode();
  return {
    kind: 'still',
    width: img.naturalWidth,
    height: img.naturalHeight,
    frameAt: async () => img,
    destroy: () => {
      img.src = '';
    },
  };
}

/** Seconds into the video of a shot frame: the middle of the frame, so rounding never lands on its neighbour. */
export function videoTimeOf(shotFrame: number, firstFrame: number, fps: number, duration = Infinity): number {
  const t = (shotFrame - firstFrame + 0.5) / fps;
  return Math.max(0, Math.min(t, Number.isFinite(duration) ? Math.max(0, duration - 0.5 / fps) : t));
}

async function openVideoPlate(o: PlateOpenOptions): Promise<PlateFrameSource> {
  const video = document.createElement('video');
  video.crossOrigin = 'anonymous';
  video.muted = true;
  video.playsInline = true;
  video.preload = 'auto';
  video.src = o.url;
  await new Promise<void>((resolve, reject) => {
    video.addEventListener('loadeddata', () => resolve(), { once: true });
    video.addEventListener('error', () => reject(new Error('The video plate could not be read by this browser')), { once: true });
  });
  const canvas = document.createElement('canvas');
  canvas.width = video.videoWidth;
  canvas.height = video.videoHeight;
  const ctx = canvas.getContext('2d')!;

  let drawnFrame: number | null = null;
  let wanted: number | null = null;
  let running: Promise<PlateImage> | null = null;

  const seekTo = (t: number) =>
    new Promise<void>((resolve) => {
      if (Math.abs(video.currentTime - t) < 1e-4 && video.readyState >= 2) return resolve();
      video.addEventListener('seeked', () => resolve(), { once: true });
      video.currentTime = t;
    });

  async function drain(): Promise<PlateImage> {
    while (wanted !== null && wanted !== drawnFrame) {
      const frame = wanted;
      await seekTo(videoTimeOf(frame, plateStartFrame(o.shot), o.fps, video.duration));
      ctx.drawImage(video, 0, 0, canvas.width, canvas.height);
      drawnFrame = frame;
    }
    running = null;
    return canvas;
  }

  return {
    kind: 'video',
    width: canvas.width,
    height: canvas.height,
    frameAt(shotFrame: number) {
      wanted = shotFrame;
      if (drawnFrame === shotFrame && !running) return Promise.resolve(canvas);
      running ??= drain();
      return running;
    },
    destroy() {
      video.removeAttribute('src');
      video.load();
    },
  };
}
