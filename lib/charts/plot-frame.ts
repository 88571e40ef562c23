/**
 * The geometry of one chart, shared by what Victory draws and what the pointer reads: the
 * domain (data range plus a margin, so no dot sits on an axis), the axes pinned to the plot's
 * edges, and the mapping between data and pixels. Pure: no React, no DOM.
 */

export type Padding = { top: number; right: number; bottom: number; left: number };
export type Range = [number, number];
export type Domain = { x: Range; y: Range };
export type Point = { x: number; y: number };

/** A chart's size (px), its padding (px) and its data domain: enough to place any point. */
export type PlotFrame = { width: number; height: number; padding: Padding; domain: Domain };

/**
 * [min, max] of the finite values widened by `share` of the span on each side. A single value
 * (or all equal) gets ±5 % of its magnitude (±1 when it is 0) so the scale still has a span.
 */
export function paddedRange(values: readonly number[], share = 0.04): Range {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (lo === Infinity) return [0, 1];
  if (hi === lo) {
    const half = lo === 0 ? 1 : Math.abs(lo) * 0.05;
    return [lo - half, hi + half];
  }
  const pad = (hi - lo) * share;
  return [lo - pad, hi + pad];
}

/** The padded domain of several point series together. */
export function domainOf(series: readonly (readonly Point[])[], share = { x: 0.03, y: 0.05 }): Domain {
  const all = series.flat();
  return { x: paddedRange(all.map((p) => p.x), share.x), y: paddedRange(all.map((p) => p.y), share.y) };
}

/**
 * Props that keep both Victory axes on the plot's edges (left and bottom). Victory otherwise
 * crosses them at the other axis's zero, which puts the current axis inside an I-V plot that
 * starts below 0 V and the voltage axis through the middle of a residual plot.
 */
export function edgeAxes(padding: Padding): { x: { crossAxis: false; offsetY: number }; y: { crossAxis: false; offsetX: number } } {
  return { x: { crossAxis: false, offsetY: padding.bottom }, y: { crossAxis: false, offsetX: padding.left } };
}

/** Data → pixel position within the chart (origin top-left, y down), as Victory's linear scales. */
export function toPixel(f: PlotFrame, p: Point): { px: number; py: number } {
  const { width, height, padding: pd, domain: d } = f;
  const px = pd.left + ((p.x - d.x[0]) / (d.x[1] - d.x[0])) * (width - pd.left - pd.right);
  const py = height - pd.bottom - ((p.y - d.y[0]) / (d.y[1] - d.y[0])) * (height - pd.top - pd.bottom);
  return { px, py };
}

/** Pixel position within the chart → data. */
export function toData(f: PlotFrame, px: number, py: number): Point {
  const { width, height, padding: pd, domain: d } = f;
  const x = d.x[0] + ((px - pd.left) / (width - pd.left - pd.right)) * (d.x[1] - d.x[0]);
  const y = d.y[0] + ((height - pd.bottom - py) / (height - pd.top - pd.bottom)) * (d.y[1] - d.y[0]);
  return { x, y };
}

/** True when the pixel lies inside the plotting area (between the axes), with `slack` px around it. */
export function inPlot(f: PlotFrame, px: number, py: number, slack = 0): boolean {
  const { width, height, padding: pd } = f;
  return px >= pd.left - slack && px <= width - pd.right + slack && py >= pd.top - slack && py <= height - pd.bottom + slack;
}

/**
 * The point nearest to a pixel position, measured on screen (so a steep part of a curve is not
 * favoured over a flat one by the units of the axes). Returns its index in `points` and its
 * distance in px, or null when there are no finite points.
 */
export function nearestPoint(f: PlotFrame, points: readonly Point[], px: number, py: number): { index: number; distance_px: number } | null {
  let best = -1;
  let bestD2 = Infinity;
  for (let k = 0; k < points.length; k++) {
    const p = points[k];
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) continue;
    const q = toPixel(f, p);
    const d2 = (q.px - px) ** 2 + (q.py - py) ** 2;
    if (d2 < bestD2) {
      bestD2 = d2;
      best = k;
    }
  }
  return best < 0 ? null : { index: best, distance_px: Math.sqrt(bestD2) };
}
