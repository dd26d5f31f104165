// The seat map: a drawing of one cylinder head with every seat's state and fade sparkline, each
// seat a link to its bench screen. Plain server-rendered SVG and links, so the map is usable
// before (or without) any JavaScript and prints as it looks.
import { SEAT_STATE_LABELS } from "@/lib/labels";
import { seatMapLayout, type SeatSlotLayout } from "@/lib/heads/seat-map-geometry";
import { Sparkline } from "@/components/heads/sparkline";

export type SeatMapState = "waiting" | "lapping" | "settled" | "stalled" | "approved" | "sent_back";

export interface SeatMapSeat {
  id: string;
  cylinder: number; // from the timing end, 1-based
  kind: "intake" | "exhaust";
  position: number; // 1-based among this cylinder's valves of that kind
  state: SeatMapState;
  contrastsDb: number[]; // the latest stage's onset contrasts stroke by stroke (empty when none)
  valveTag: string | null;
  /** The supervisor's reason, while the seat stands sent back. */
  sentBack?: { comment: string; by: string } | null;
}

export interface SeatMapProps {
  arrangement: "inline" | "v";
  cylinderCount: number;
  intakeValvesPerCylinder: number;
  exhaustValvesPerCylinder: number;
  camshaftCount: number;
  seats: SeatMapSeat[];
  settledThresholdDb?: number; // default 1.5
  hrefFor?: (seatId: string) => string; // default `/bench/${id}`
  /** Accessible name of the drawing, e.g. the head's label. Default "Seat map". */
  label?: string;
}

/** Matches the settled rule's highest contrast in lib/audio (settledMaxContrastDb). */
export const DEFAULT_SETTLED_THRESHOLD_DB = 1.5;

const STATE_ORDER: SeatMapState[] = [
  "waiting",
  "lapping",
  "settled",
  "stalled",
  "approved",
  "sent_back",
];

// Colour follows the tones in lib/labels.ts; the mark, stroke weight and dash carry the same
// meaning for anyone who cannot tell the colours apart, and on a black-and-white printout.
const SEAT_STATE_MARKS: Record<SeatMapState, string> = {
  waiting: "–",
  lapping: "~",
  settled: "✓",
  stalled: "!",
  approved: "★",
  sent_back: "↩\uFE0E",
};

interface SeatTone {
  circle: string;
  text: string;
  strokeWidth: number;
  dash?: string;
  innerRing?: boolean;
}

const SEAT_STATE_SVG_TONES: Record<SeatMapState, SeatTone> = {
  waiting: {
    circle: "fill-stone-100 stroke-stone-500",
    text: "fill-stone-700",
    strokeWidth: 1.5,
    dash: "4 3",
  },
  lapping: { circle: "fill-sky-100 stroke-sky-700", text: "fill-sky-900", strokeWidth: 2 },
  settled: {
    circle: "fill-emerald-100 stroke-emerald-700",
    text: "fill-emerald-900",
    strokeWidth: 3.5,
  },
  stalled: {
    circle: "fill-amber-100 stroke-amber-600",
    text: "fill-amber-900",
    strokeWidth: 2,
    innerRing: true,
  },
  approved: { circle: "fill-teal-700 stroke-teal-900", text: "fill-white", strokeWidth: 3.5 },
  sent_back: {
    circle: "fill-rose-100 stroke-rose-700",
    text: "fill-rose-900",
    strokeWidth: 3,
    dash: "7 3",
  },
};

function formatDb(db: number): string {
  return `${db.toFixed(1)} dB`;
}

/** What a screen reader announces for a seat, e.g. "Cylinder 3 exhaust 1, settled, valve 3E1". */
export function seatAccessibleName(seat: SeatMapSeat): string {
  const state = SEAT_STATE_LABELS[seat.state];
  const parts = [
    `Cylinder ${seat.cylinder} ${seat.kind} ${seat.position}`,
    state.charAt(0).toLowerCase() + state.slice(1),
    seat.valveTag ? `valve ${seat.valveTag}` : "no valve tagged",
  ];
  const strokes = seat.contrastsDb.filter((v) => Number.isFinite(v));
  if (strokes.length > 0) {
    parts.push(
      `${strokes.length} ${strokes.length === 1 ? "stroke" : "strokes"}, latest ${formatDb(strokes[strokes.length - 1])}`,
    );
  }
  return parts.join(", ");
}

function SeatDisc({
  state,
  cx,
  cy,
  r,
}: {
  state: SeatMapState;
  cx: number;
  cy: number;
  r: number;
}) {
  const tone = SEAT_STATE_SVG_TONES[state];
  return (
    <>
      <circle
        cx={cx}
        cy={cy}
        r={r - tone.strokeWidth / 2}
        className={tone.circle}
        strokeWidth={tone.strokeWidth}
        strokeDasharray={tone.dash}
      />
      {tone.innerRing ? (
        <circle
          cx={cx}
          cy={cy}
          r={r - 6}
          fill="none"
          className="stroke-amber-600"
          strokeWidth={1.5}
        />
      ) : null}
    </>
  );
}

function SeatLink({
  slot,
  seat,
  href,
  thresholdDb,
}: {
  slot: SeatSlotLayout;
  seat: SeatMapSeat;
  href: string;
  thresholdDb: number;
}) {
  const tone = SEAT_STATE_SVG_TONES[seat.state];
  const strokes = seat.contrastsDb.filter((v) => Number.isFinite(v));
  const showSpark = strokes.length > 0 && slot.spark.width > 0;
  return (
    // The global focus outline is drawn round the link's whole bounding box in some browsers;
    // the round ring below marks the seat itself instead, so the outline is switched off here.
    <a
      href={href}
      aria-label={seatAccessibleName(seat)}
      className="group cursor-pointer"
      style={{ outline: "none" }}
      data-seat-id={seat.id}
      data-state={seat.state}
    >
      {showSpark ? (
        <>
          {/* One tap area over the disc, the sparkline and the gap between them: a finger on
              any of it opens the seat, never the head drawn underneath. */}
          <rect
            x={Math.min(slot.cx - slot.r, slot.spark.x)}
            y={Math.min(slot.cy - slot.r, slot.spark.y)}
            width={Math.max(slot.cx + slot.r, slot.spark.x + slot.spark.width) - Math.min(slot.cx - slot.r, slot.spark.x)}
            height={Math.max(slot.cy + slot.r, slot.spark.y + slot.spark.height) - Math.min(slot.cy - slot.r, slot.spark.y)}
            fill="transparent"
            pointerEvents="all"
            aria-hidden="true"
          />
          <Sparkline contrastsDb={strokes} thresholdDb={thresholdDb} box={slot.spark} />
          <text
            x={slot.sparkCaptionX}
            y={slot.sparkCaptionY}
            textAnchor={slot.sparkCaptionAnchor}
            className="figure fill-stone-700"
            fontSize={9}
            aria-hidden="true"
          >
            {formatDb(strokes[strokes.length - 1])}
          </text>
        </>
      ) : null}
      <circle
        cx={slot.cx}
        cy={slot.cy}
        r={slot.r + 5}
        fill="none"
        className="stroke-brass opacity-0 group-hover:opacity-40 group-focus-visible:opacity-100 print:hidden"
        strokeWidth={3}
      />
      <SeatDisc state={seat.state} cx={slot.cx} cy={slot.cy} r={slot.r} />
      <text
        x={slot.cx}
        y={slot.cy + 1}
        textAnchor="middle"
        className={`figure font-bold ${tone.text}`}
        fontSize={11}
        aria-hidden="true"
      >
        {slot.code}
      </text>
      <text
        x={slot.cx}
        y={slot.cy + 15}
        textAnchor="middle"
        className={`font-bold ${tone.text}`}
        fontSize={12}
        aria-hidden="true"
      >
        {SEAT_STATE_MARKS[seat.state]}
      </text>
    </a>
  );
}

function EmptySlot({ slot }: { slot: SeatSlotLayout }) {
  return (
    <g
      role="img"
      aria-label={`Cylinder ${slot.cylinder} ${slot.kind} ${slot.position}, no seat recorded`}
    >
      <circle
        cx={slot.cx}
        cy={slot.cy}
        r={slot.r - 1}
        className="fill-white stroke-stone-300"
        strokeWidth={1.5}
        strokeDasharray="2 3"
      />
      <text
        x={slot.cx}
        y={slot.cy + 4}
        textAnchor="middle"
        className="figure fill-stone-400"
        fontSize={11}
        aria-hidden="true"
      >
        {slot.code}
      </text>
    </g>
  );
}

// Labels that cross a camshaft line or sit on the head's body keep a paper-coloured halo.
const HALO = { className: "stroke-white", strokeWidth: 3, paintOrder: "stroke" } as const;

export function SeatMap(props: SeatMapProps) {
  const thresholdDb = props.settledThresholdDb ?? DEFAULT_SETTLED_THRESHOLD_DB;
  const hrefFor = props.hrefFor ?? ((id: string) => `/bench/${id}`);
  const layout = seatMapLayout(props);
  const seatsById = new Map(props.seats.map((s) => [s.id, s]));

  return (
    <div className="flex flex-col gap-3">
      {/* Scrolls sideways only when the screen is too narrow for full-size seat targets. */}
      <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white p-1 print:overflow-visible print:border-stone-500">
        <svg
          viewBox={layout.viewBox}
          width={layout.width}
          height={layout.height}
          className="mx-auto block h-auto w-full font-sans"
          style={{ minWidth: layout.minWidthPx, maxWidth: layout.width * 1.5 }}
          aria-label={props.label ?? "Seat map"}
          data-testid="seat-map"
        >
          {layout.blocks.map((block) => (
            <g key={block.bank ?? "head"} aria-hidden="true">
              {block.title && block.titleY !== null ? (
                <text
                  x={block.centerX}
                  y={block.titleY}
                  textAnchor="middle"
                  fontSize={14}
                  className="fill-stone-900 font-bold"
                >
                  {block.title}
                </text>
              ) : null}
              <text
                x={block.intakeLabelX}
                y={block.headerY}
                fontSize={11}
                className="fill-stone-700 font-semibold"
              >
                Intake side
              </text>
              <text
                x={block.centerX}
                y={block.headerY}
                textAnchor="middle"
                fontSize={11}
                className="fill-stone-900 font-semibold"
              >
                Timing end
              </text>
              <text
                x={block.exhaustLabelX}
                y={block.headerY}
                textAnchor="end"
                fontSize={11}
                className="fill-stone-700 font-semibold"
              >
                Exhaust side
              </text>
              <rect
                {...block.body}
                rx={10}
                className="fill-stone-200 stroke-stone-500"
                strokeWidth={1.5}
              />
              <rect {...block.timingBar} rx={2} className="fill-stone-800" />
            </g>
          ))}

          <g aria-hidden="true">
            {layout.cylinders.map((c) => (
              <g key={c.cylinder}>
                <circle
                  cx={c.cx}
                  cy={c.cy}
                  r={c.r}
                  className="fill-white stroke-stone-500"
                  strokeWidth={1.5}
                />
                <line
                  x1={c.cx}
                  x2={c.cx}
                  y1={c.labelY + 5}
                  y2={c.cy + c.r - 6}
                  className="stroke-stone-300"
                  strokeWidth={1}
                  strokeDasharray="2 3"
                />
              </g>
            ))}
            {layout.camshafts.map((cam) => (
              <g key={cam.label}>
                <line
                  x1={cam.x}
                  x2={cam.x}
                  y1={cam.y1}
                  y2={cam.y2}
                  className="stroke-stone-500"
                  strokeWidth={4}
                  strokeLinecap="round"
                  opacity={0.75}
                />
                <text
                  x={cam.labelX}
                  y={cam.labelY}
                  textAnchor="middle"
                  fontSize={10}
                  className="fill-stone-700"
                >
                  {cam.label}
                </text>
              </g>
            ))}
            {layout.cylinders.map((c) => (
              <text
                key={c.cylinder}
                x={c.cx}
                y={c.labelY}
                textAnchor="middle"
                fontSize={12}
                className={`figure font-bold fill-stone-900 ${HALO.className}`}
                strokeWidth={HALO.strokeWidth}
                paintOrder={HALO.paintOrder}
              >
                {c.cylinder}
              </text>
            ))}
          </g>

          {layout.seats.map((slot) => {
            const seat = slot.seatId ? seatsById.get(slot.seatId) : undefined;
            return seat ? (
              <SeatLink
                key={slot.key}
                slot={slot}
                seat={seat}
                href={hrefFor(seat.id)}
                thresholdDb={thresholdDb}
              />
            ) : (
              <EmptySlot key={slot.key} slot={slot} />
            );
          })}
        </svg>
      </div>
      {props.seats.some((s) => s.state === "sent_back" && s.sentBack) ? (
        <ul className="flex flex-col gap-2" aria-label="Seats sent back, with the supervisor's reasons" data-testid="sent-back-list">
          {layout.seats.flatMap((slot) => {
            const seat = slot.seatId ? seatsById.get(slot.seatId) : undefined;
            if (!seat || seat.state !== "sent_back" || !seat.sentBack) return [];
            return [
              <li key={seat.id}>
                <a href={hrefFor(seat.id)} className="flex min-h-11 flex-col justify-center rounded-lg border-2 border-rose-300 bg-rose-50 px-3 py-2 text-rose-950">
                  <span>
                    <span className="figure font-bold">{slot.code}</span> sent back by {seat.sentBack.by}
                  </span>
                  <span className="text-sm">{seat.sentBack.comment}</span>
                </a>
              </li>,
            ];
          })}
        </ul>
      ) : null}
      <SeatMapLegend thresholdDb={thresholdDb} />
    </div>
  );
}

export function SeatMapLegend({
  thresholdDb = DEFAULT_SETTLED_THRESHOLD_DB,
}: {
  thresholdDb?: number;
}) {
  const r = 12;
  return (
    <div className="flex flex-col gap-2 text-sm">
      <ul className="flex flex-wrap gap-x-4 gap-y-2" aria-label="Seat states">
        {STATE_ORDER.map((state) => (
          <li key={state} className="flex items-center gap-2">
            <svg
              width={2 * r + 2}
              height={2 * r + 2}
              viewBox={`${-r - 1} ${-r - 1} ${2 * r + 2} ${2 * r + 2}`}
              aria-hidden="true"
            >
              <SeatDisc state={state} cx={0} cy={0} r={r} />
              <text
                x={0}
                y={4}
                textAnchor="middle"
                fontSize={11}
                className={`font-bold ${SEAT_STATE_SVG_TONES[state].text}`}
              >
                {SEAT_STATE_MARKS[state]}
              </text>
            </svg>
            <span>{SEAT_STATE_LABELS[state]}</span>
          </li>
        ))}
      </ul>
      <p className="text-stone-600">
        Cylinders are numbered from the timing end. Beside each seat with strokes: its onset
        contrast stroke by stroke in the latest stage, a dashed line at the settled threshold (
        <span className="figure">{formatDb(thresholdDb)}</span>) and the latest stroke&apos;s
        figure. <span className="print:hidden">Tap a seat to open it at the bench.</span>
      </p>
    </div>
  );
}
