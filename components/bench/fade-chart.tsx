"use client";

// The fade curve: onset contrast stroke by stroke, the fitted decay, and the settled band.
// Drawn with uPlot (canvas, about a tenth of the weight of an SVG chart library) because it is
// redrawn live on a phone after every stroke.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { FadeFit } from "@/lib/audio/fade";
import { fadeAxes, fadeData, fadeSeries, fadeYRange, shadeSettledZone } from "./fade-plot";

export interface ChartStroke {
  n: number;
  contrastDb: number;
  pending?: boolean;
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
        y: { range: () => fadeYRange(latest.current.strokes.map((s) => s.contrastDb)) },
      },
      axes: fadeAxes(14),
      series: fadeSeries(),
      hooks: { drawClear: [shadeSettledZone(() => latest.current.threshold)] },
    };
    const u = new uPlot(opts, fadeData(latest.current.strokes, null), el);
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
    plot.current?.setData(fadeData(strokes, fit));
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
