// The fade curve's uPlot pieces, shared by the bench screen's live chart and the review page's
// chart: the same scale, axes, series and settled-zone shading, so both read alike.
import type uPlot from "uplot";
import { fadeAt, type FadeFit } from "@/lib/audio/fade";

const INK = "#1c1917";
export const BRASS = "#b45309";

export interface PlotStroke {
  n: number;
  contrastDb: number;
  /** Reasons the stroke was left out of the verdict; empty or absent when judged. */
  flags?: readonly string[];
}

export const isLeftOut = (s: PlotStroke) => (s.flags?.length ?? 0) > 0;

/**
 * uPlot's columns: stroke numbers; judged contrasts; left-out contrasts (drawn
 * hollow, apart); the fitted curve through the judged strokes only. The fit
 * counts judged strokes, so its k-th value belongs at the k-th judged stroke.
 */
export function fadeData(strokes: ReadonlyArray<PlotStroke>, fit: FadeFit | null): uPlot.AlignedData {
  let judged = 0;
  const curve = strokes.map((s) => {
    if (isLeftOut(s)) return null;
    judged += 1;
    return fit ? fadeAt(fit, judged) : null;
  });
  return [
    strokes.map((s) => s.n),
    strokes.map((s) => (isLeftOut(s) ? null : s.contrastDb)),
    strokes.map((s) => (isLeftOut(s) ? s.contrastDb : null)),
    curve,
  ];
}

/** Room for every point plus 1 dB, and never less than −1…6 dB so an early curve is not blown up. */
export function fadeYRange(contrastsDb: readonly number[]): [number, number] {
  return [Math.floor(Math.min(-1, ...contrastsDb.map((v) => v - 1))), Math.ceil(Math.max(6, ...contrastsDb.map((v) => v + 1)))];
}

export function fadeAxes(fontPx: number): uPlot.Axis[] {
  const font = `${fontPx}px Inter, sans-serif`;
  return [
    { stroke: INK, grid: { stroke: "#e7e5e4" }, incrs: [1, 2, 5, 10, 20, 50], font },
    { stroke: INK, grid: { stroke: "#e7e5e4" }, size: 56, values: (_u, ticks) => ticks.map((t) => `${t} dB`), font },
  ];
}

export function fadeSeries(): uPlot.Series[] {
  return [
    {},
    { label: "Onset contrast", stroke: BRASS, width: 3, spanGaps: true, points: { show: true, size: 9, fill: BRASS, stroke: BRASS } },
    // Left out of the verdict: hollow rings, no line, so they read as apart from the curve.
    { label: "Left out", stroke: "#57534e", width: 0, points: { show: true, size: 11, width: 2, fill: "#ffffff", stroke: "#57534e" } },
    { label: "Fitted fade", stroke: "#78716c", width: 2, dash: [6, 4], spanGaps: true, points: { show: false } },
  ];
}

/** A drawClear hook shading the settled zone: everything at or below the threshold. */
export function shadeSettledZone(thresholdDb: () => number): (u: uPlot) => void {
  return (u) => {
    const top = u.valToPos(thresholdDb(), "y", true);
    const bottom = u.bbox.top + u.bbox.height;
    if (top >= bottom) return;
    u.ctx.save();
    u.ctx.fillStyle = "rgba(16, 185, 129, 0.18)";
    u.ctx.fillRect(u.bbox.left, Math.max(u.bbox.top, top), u.bbox.width, bottom - Math.max(u.bbox.top, top));
    u.ctx.restore();
  };
}
