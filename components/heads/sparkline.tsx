// A seat's fade curve in miniature: one stage's onset contrasts stroke by stroke and the settled
// threshold, drawn inside a parent <svg>. Static markup, so it renders on the server.
import { sparklineGeometry, type Rect } from "@/lib/heads/seat-map-geometry";

export interface SparklineProps {
  contrastsDb: readonly number[];
  thresholdDb: number;
  box: Rect;
}

export function Sparkline({ contrastsDb, thresholdDb, box }: SparklineProps) {
  const g = sparklineGeometry(contrastsDb, thresholdDb, box);
  if (!g) return null;
  const last = g.points[g.points.length - 1];
  return (
    <g aria-hidden="true">
      <rect
        x={box.x}
        y={box.y}
        width={box.width}
        height={box.height}
        rx={3}
        className="fill-stone-50 stroke-stone-200 print:fill-white"
        strokeWidth={1}
      />
      {/* Dashed as well as faint, so the threshold still reads as a guide in black and white. */}
      <line
        x1={box.x}
        x2={box.x + box.width}
        y1={g.thresholdY}
        y2={g.thresholdY}
        className="stroke-emerald-600 print:stroke-stone-500"
        strokeWidth={1}
        strokeDasharray="3 2"
        opacity={0.7}
      />
      {g.points.length > 1 ? (
        <polyline
          points={g.polyline}
          fill="none"
          className="stroke-stone-800 print:stroke-black"
          strokeWidth={1.5}
          strokeLinejoin="round"
          strokeLinecap="round"
        />
      ) : null}
      <circle cx={last.x} cy={last.y} r={2.5} className="fill-stone-900 print:fill-black" />
    </g>
  );
}
