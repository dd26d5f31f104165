"use client";

import { CartesianGrid, Line, LineChart, ReferenceArea, ResponsiveContainer, XAxis, YAxis } from "recharts";
import { fadeAt, type FadeFit } from "@/lib/audio/fade";

export interface ChartStroke {
  n: number;
  contrastDb: number;
  pending?: boolean;
}

/** The fade curve: onset contrast stroke by stroke, the fitted decay, and the settled band. */
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
  const data = strokes.map((s) => ({
    n: s.n,
    contrast: Math.round(s.contrastDb * 10) / 10,
    fit: fit ? Math.round(fadeAt(fit, s.n) * 10) / 10 : undefined,
  }));
  const maxY = Math.max(6, ...strokes.map((s) => s.contrastDb + 1));
  const minY = Math.min(-1, ...strokes.map((s) => s.contrastDb - 1));
  return (
    <div style={{ height }} data-testid="fade-chart" data-strokes={strokes.length}>
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 12, bottom: 4, left: -12 }}>
          <CartesianGrid stroke="#d6d3d1" strokeDasharray="3 3" />
          <ReferenceArea y1={minY} y2={thresholdDb} fill="#10b981" fillOpacity={0.18} ifOverflow="hidden" />
          <XAxis dataKey="n" type="number" domain={[1, Math.max(8, strokes.length)]} allowDecimals={false} tick={{ fontSize: 14 }} />
          <YAxis domain={[Math.floor(minY), Math.ceil(maxY)]} tick={{ fontSize: 14 }} unit=" dB" width={64} />
          {fit ? <Line dataKey="fit" stroke="#78716c" strokeDasharray="6 4" dot={false} isAnimationActive={false} /> : null}
          <Line
            dataKey="contrast"
            stroke="#b45309"
            strokeWidth={3}
            dot={{ r: 4, fill: "#b45309" }}
            isAnimationActive={false}
          />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}
