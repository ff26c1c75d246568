// A video plate is seeked by the plate's first frame: one placement rule (plateStartFrame) for the player, the share
// page, compare and exports. The <video> is a stand-in that records where it was asked to seek.
import { describe, it, expect, afterEach } from 'vitest';
import { openPlate, plateStartFrame, videoTimeOf } from '../../src/lib/plate';

class FakeVideo extends EventTarget {
  static last: FakeVideo | null = null;
  seeks: number[] = [];
  videoWidth = 64;
  videoHeight = 36;
  duration = 10;
  readyState = 4;
  crossOrigin = '';
  muted = false;
  playsInline = false;
  preload = '';
  private time = 0;
  constructor() {
    super();
    FakeVideo.last = this;
  }
  set src(_url: string) {
    queueMicrotask(() => this.dispatchEvent(new Event('loadeddata')));
  }
  get currentTime() {
    return this.time;
  }
  set currentTime(t: number) {
    this.time = t;
    this.seeks.push(t);
    queueMicrotask(() => this.dispatchEvent(new Event('seeked')));
  }
  removeAttribute() {}
  load() {}
}

function fakeDocument() {
  const canvas = { width: 0, height: 0, getContext: () => ({ drawImage() {} }) };
  (globalThis as any).document = { createElement: (tag: string) => (tag === 'video' ? new FakeVideo() : canvas) };
}

afterEach(() => {
  delete (globalThis as any).document;
});

describe('video plate seek', () => {
  it("the plate's first frame when set, else the cut in", () => {
    expect(plateStartFrame({ firstFrame: 1009, plateFirstFrame: 1001 })).toBe(1001);
    expect(plateStartFrame({ firstFrame: 1009, plateFirstFrame: null })).toBe(1009);
    expect(plateStartFrame({ firstFrame: 1009 })).toBe(1009);
  });

  it('a plate delivered with 8 head handles shows the cut in (1009) 8 frames into the video', async () => {
    fakeDocument();
    const fps = 24;
    const plate = await openPlate({ url: 'blob:plate', contentType: 'video/mp4', shot: { firstFrame: 1009, plateFirstFrame: 1001 }, fps });
    await plate.frameAt(1009);
    // The middle of the plate's 9th picture (index 8): (8 + 0.5) / 24 s.
    expect(FakeVideo.last!.seeks.at(-1)).toBeCloseTo(8.5 / 24, 9);
    await plate.frameAt(1001);
    expect(FakeVideo.last!.seeks.at(-1)).toBeCloseTo(0.5 / 24, 9);
  });

  it('without a plate first frame the cut in is the first picture', async () => {
    fakeDocument();
    const plate = await openPlate({ url: 'blob:plate', contentType: 'video/mp4', shot: { firstFrame: 1009, plateFirstFrame: null }, fps: 25 });
    await plate.frameAt(1019);
    expect(FakeVideo.last!.seeks.at(-1)).toBeCloseTo(videoTimeOf(1019, 1009, 25, 10), 9);
    expect(FakeVideo.last!.seeks.at(-1)).toBeCloseTo(10.5 / 25, 9);
  });
});
