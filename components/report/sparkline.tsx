// A seat's fade curve as a tiny static SVG: no script and no canvas, so it prints as it shows.
export function Sparkline({
  values,
  thresholdDb,
  width = 120,
  height = 32,
}: {
  values: number[];
  thresholdDb: number;
  width?: number;
  height?: number;
}) {
  if (values.length === 0) return <span className="text-xs text-stone-500">no strokes</span>;
  const pad = 2;
  const top = Math.max(thresholdDb + 1, ...values);
  const bottom = Math.min(0, ...values);
  const span = top - bottom || 1;
  const x = (i: number) => pad + (values.length === 1 ? (width - 2 * pad) / 2 : (i * (width - 2 * pad)) / (values.length - 1));
  const y = (v: number) => pad + ((top - v) * (height - 2 * pad)) / span;
  const points = values.map((v, i) => `${x(i).toFixed(1)},${y(v).toFixed(1)}`).join(" ");
  const band = y(thresholdDb);
  return (
    <svg
      width={width}
      height={height}
      viewBox={`0 0 ${width} ${height}`}
      role="img"
      aria-label={`Fade curve, ${values.length} strokes, from ${values[0]!.toFixed(1)} dB to ${values[values.length - 1]!.toFixed(1)} dB`}
      data-testid="sparkline"
    >
      {/* The settled band: at or below the rule's highest contrast. */}
      <rect x={0} y={band} width={width} height={Math.max(0, height - band)} fill="rgba(16,185,129,0.18)" />
      <polyline points={points} fill="none" stroke="#b45309" strokeWidth={1.5} strokeLinejoin="round" />
      <circle cx={x(values.length - 1)} cy={y(values[values.length - 1]!)} r={2} fill="#b45309" />
    </svg>
  );
}
