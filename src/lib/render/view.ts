// Where the tank lands on screen: metres (tank coordinates, y up) → view pixels (y down), through the plate's scale.
// Pure TypeScript with no DOM, so exports and the editor place particles exactly as the player does.

/** A rectangle in view pixels. */
export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** view x = ox + x·sx, view y = oy − y·sy, with x and y in metres. */
export interface TankToView {
  ox: number;
  oy: number;
  /** View pixels per metre along x and y (equal unless the plate's pixels are not square). */
  sx: number;
  sy: number;
}

export interface ViewLayoutInput {
  /** Size of the view (canvas) in pixels. */
  viewWidth: number;
  viewHeight: number;
  /** Tank size in metres. */
  tankWidth: number;
  tankHeight: number;
  /** The plate's size in its own pixels, when the shot has one. */
  plate?: { width: number; height: number } | null;
  /** Metres per plate pixel (the shot's scale); without it the tank is fitted to the view. */
  metresPerPixel?: number | null;
}

export interface ViewLayout {
  /** Where the plate is drawn (letterboxed into the view), or null without a plate. */
  plateRect: Rect | null;
  /** Where the tank's rectangle lands. */
  tankRect: Rect;
  toView: TankToView;
}

/** Returns the largest rectangle of the given aspect centred in the view. */
export function fitRect(viewWidth: number, viewHeight: number, width: number, height: number): Rect {
  const scale = Math.min(viewWidth / width, viewHeight / height);
  const w = width * scale;
  const h = height * scale;
  return { x: (viewWidth - w) / 2, y: (viewHeight - h) / 2, width: w, height: h };
}

/**
 * Lays out plate and tank in the view. With a plate and a scale, the tank's lower-left corner sits on the plate's
 * bottom-left pixel and one metre spans 1/metresPerPixel plate pixels; otherwise the tank is fitted to the view.
 */
export function layoutView(input: ViewLayoutInput): ViewLayout {
  const { viewWidth, viewHeight, tankWidth, tankHeight, plate, metresPerPixel } = input;
  const plateRect = plate && plate.width > 0 && plate.height > 0 ? fitRect(viewWidth, viewHeight, plate.width, plate.height) : null;
  if (plateRect && plate && metresPerPixel && metresPerPixel > 0) {
    const viewPerPlatePixel = plateRect.width / plate.width;
    const s = viewPerPlatePixel / metresPerPixel;
    const toView = { ox: plateRect.x, oy: plateRect.y + plateRect.height, sx: s, sy: s };
    return { plateRect, toView, tankRect: { x: toView.ox, y: toView.oy - tankHeight * s, width: tankWidth * s, height: tankHeight * s } };
  }
  const tankRect = fitRect(viewWidth, viewHeight, tankWidth, tankHeight);
  const s = tankRect.width / tankWidth;
  return { plateRect, tankRect, toView: { ox: tankRect.x, oy: tankRect.y + tankRect.height, sx: s, sy: s } };
}
