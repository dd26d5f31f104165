"use client";

// The fade curve: onset contrast stroke by stroke, the fitted decay, and the settled band.
// Drawn with uPlot (canvas, about a tenth of the weight of an SVG chart library) because it is
// redrawn live on a phone after every stroke.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { fadeAt, type FadeFit } from "@/lib/audio/fade";

export interface ChartStroke {
  n: number;
  contrastDb: number;
  pending?: boolean;
}

const INK = "#1c1917";
const BRASS = "#b45309";

function chartData(strokes: ChartStroke[], fit: FadeFit | null): uPlot.AlignedData {
  const xs = strokes.map((s) => s.n);
  const ys = strokes.map((s) => s.contrastDb);
  const fitted = strokes.map((s) => (fit ? fadeAt(fit, s.n) : null));
  return [xs, ys, fitted];
}

function yRange(strokes: ChartStroke[]): [number, number] {
  const values = strokes.map((s) => s.contrastDb);
  return [Math.floor(Math.min(-1, ...values.map((v) => v - 1))), Math.ceil(Math.max(6, ...values.map((v) => v + 1)))];
}

export function FadeChart({
  strokes,
  fit,
  thresholdDb,
  height = 220,
}: {
  strokes: ChartStroke[];
  fit: FadeFit | null;
  thresholdDb: number;
  height?: number;
}) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef({ strokes, threshold: thresholdDb });
  useEffect(() => {
    latest.current = { strokes, threshold: thresholdDb };
  });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const opts: uPlot.Options = {
      width: el.clientWidth || 320,
      height,
      legend: { show: false },
      cursor: { show: false },
      scales: {
        x: { time: false, range: (_u, _min, max) => [1, Math.max(8, max ?? 8)] },
        y: { range: () => yRange(latest.current.strokes) },
      },
      axes: [
        { stroke: INK, grid: { stroke: "#e7e5e4" }, incrs: [1, 2, 5, 10, 20, 50], font: "14px Inter, sans-serif" },
        {
          stroke: INK,
          grid: { stroke: "#e7e5e4" },
          size: 56,
          values: (_u, ticks) => ticks.map((t) => `${t} dB`),
          font: "14px Inter, sans-serif",
        },
      ],
      series: [
        {},
        { label: "Onset contrast", stroke: BRASS, width: 3, points: { show: true, size: 9, fill: BRASS, stroke: BRASS } },
        { label: "Fitted fade", stroke: "#78716c", width: 2, dash: [6, 4], points: { show: false } },
      ],
      hooks: {
        // The settled zone: everything at or below the threshold, shaded under the curve.
        drawClear: [
          (u) => {
            const top = u.valToPos(latest.current.threshold, "y", true);
            const bottom = u.bbox.top + u.bbox.height;
            if (top >= bottom) return;
            u.ctx.save();
            u.ctx.fillStyle = "rgba(16, 185, 129, 0.18)";
            u.ctx.fillRect(u.bbox.left, Math.max(u.bbox.top, top), u.bbox.width, bottom - Math.max(u.bbox.top, top));
            u.ctx.restore();
          },
        ],
      },
    };
    const u = new uPlot(opts, chartData(latest.current.strokes, null), el);
    plot.current = u;
    const resize = new ResizeObserver(() => u.setSize({ width: el.clientWidth, height }));
    resize.observe(el);
    return () => {
      resize.disconnect();
      u.destroy();
      plot.current = null;
    };
  }, [height]);

  useEffect(() => {
    plot.current?.setData(chartData(strokes, fit));
  }, [strokes, fit, thresholdDb]);

  return (
    <div
      ref={box}
      style={{ height }}
      data-testid="fade-chart"
      data-strokes={strokes.length}
      role="img"
      aria-label={
        strokes.length
          ? `Fade curve of ${strokes.length} strokes; last onset contrast ${strokes[strokes.length - 1]!.contrastDb.toFixed(1)} dB`
          : "Fade curve: no strokes yet"
      }
    />
  );
}
