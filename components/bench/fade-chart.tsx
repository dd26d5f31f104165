"use client";

// The fade curve: onset contrast stroke by stroke, the fitted decay, and the settled band.
// Drawn with uPlot (canvas, about a tenth of the weight of an SVG chart library) because it is
// redrawn live on a phone after every stroke.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { FadeFit } from "@/lib/audio/fade";
import { fadeAxes, fadeData, fadeSeries, fadeYRange, isLeftOut, shadeSettledZone, type PlotStroke } from "./fade-plot";

export interface ChartStroke extends PlotStroke {
  pending?: boolean;
}

export function FadeChart({
  strokes,
  fit,
  thresholdDb,
  onPick,
  height = 220,
}: {
  strokes: ChartStroke[];
  fit: FadeFit | null;
  thresholdDb: number;
  /** A tap on the chart picks the nearest stroke by its number. */
  onPick?: (n: number) => void;
  height?: number;
}) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef({ strokes, threshold: thresholdDb, onPick });
  useEffect(() => {
    latest.current = { strokes, threshold: thresholdDb, onPick };
  });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const opts: uPlot.Options = {
      width: el.clientWidth || 320,
      height,
      legend: { show: false },
      // The cursor only tracks where a tap lands; nothing of it is drawn.
      cursor: { x: false, y: false, points: { show: false }, drag: { x: false, y: false } },
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
    const pick = (e: MouseEvent) => {
      const list = latest.current.strokes;
      if (!list.length || !latest.current.onPick) return;
      const rect = u.over.getBoundingClientRect();
      const at = u.posToVal(e.clientX - rect.left, "x");
      let best = list[0]!;
      for (const s of list) if (Math.abs(s.n - at) < Math.abs(best.n - at)) best = s;
      latest.current.onPick(best.n);
    };
    u.over.addEventListener("click", pick);
    const resize = new ResizeObserver(() => u.setSize({ width: el.clientWidth, height }));
    resize.observe(el);
    return () => {
      resize.disconnect();
      u.over.removeEventListener("click", pick);
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
      data-left-out={strokes.filter(isLeftOut).length}
      role="img"
      aria-label={
        strokes.length
          ? `Fade curve of ${strokes.length} strokes${strokes.some(isLeftOut) ? `, ${strokes.filter(isLeftOut).length} left out (hollow)` : ""}; last onset contrast ${strokes[strokes.length - 1]!.contrastDb.toFixed(1)} dB`
          : "Fade curve: no strokes yet"
      }
    />
  );
}
