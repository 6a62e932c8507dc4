/**
 * Zoom and pan of a slice on the canvas: screen = pan + displayMm × zoom (CSS pixels; zoom in pixels
 * per mm). Kept apart from the slice maths so both can be tested without a canvas.
 */
export interface View {
  zoom: number;
  panX: number;
  panY: number;
}

export const MIN_ZOOM_FACTOR = 0.25;
export const MAX_ZOOM_FACTOR = 16;

/** The whole slice centred in the canvas with a small margin. */
export function fitView(widthMm: number, heightMm: number, canvasW: number, canvasH: number): View {
  const zoom = Math.max(1e-3, Math.min((canvasW * 0.96) / widthMm, (canvasH * 0.96) / heightMm));
  return { zoom, panX: (canvasW - widthMm * zoom) / 2, panY: (canvasH - heightMm * zoom) / 2 };
}

/** Zooms by `factor` keeping the point under (sx, sy) still, within limits relative to the fitted zoom. */
export function zoomAt(view: View, factor: number, sx: number, sy: number, fittedZoom: number): View {
  const zoom = Math.min(fittedZoom * MAX_ZOOM_FACTOR, Math.max(fittedZoom * MIN_ZOOM_FACTOR, view.zoom * factor));
  const k = zoom / view.zoom;
  return { zoom, panX: sx - (sx - view.panX) * k, panY: sy - (sy - view.panY) * k };
}

export function toScreen(view: View, xMm: number, yMm: number): [number, number] {
  return [view.panX + xMm * view.zoom, view.panY + yMm * view.zoom];
}

export function toDisplayMm(view: View, sx: number, sy: number): [number, number] {
  return [(sx - view.panX) / view.zoom, (sy - view.panY) / view.zoom];
}
