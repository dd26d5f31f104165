// Where everything on the seat map goes: banks, chambers, seats, camshafts and sparklines, in
// viewBox units that equal CSS pixels when the drawing is shown at its natural width.
//
// The head is drawn upright, timing end at the top and cylinders running down the screen. A
// phone held upright is narrow and scrolls downwards, so running the head down the screen lets
// every seat keep a full-size touch target whatever the cylinder count: only a cylinder's own
// width has to fit across the phone, never the whole head. Lying the head on its side would need
// about 130 px per cylinder for a four-valve head, some 540 px for a four-cylinder one. On a V
// head each bank is drawn as its own block, bank A above bank B, for the same reason.
// Pure functions only, so the layout can be checked without a browser.
import { bankOf, camshaftLabels, seatCode } from "@/lib/heads/layout";

export type SeatKind = "intake" | "exhaust";
export type Bank = "A" | "B";

export interface SeatMapSeatRef {
  id: string;
  cylinder: number;
  kind: SeatKind;
  position: number;
}

export interface SeatMapLayoutInput {
  arrangement: "inline" | "v";
  cylinderCount: number;
  intakeValvesPerCylinder: number;
  exhaustValvesPerCylinder: number;
  camshaftCount: number;
  seats: readonly SeatMapSeatRef[];
}

export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface BankBlockLayout {
  bank: Bank | null;
  /** "Bank A" / "Bank B" on a V head, null on an inline one. */
  title: string | null;
  titleY: number | null;
  /** Baseline of the row that names the timing end and the two sides. */
  headerY: number;
  intakeLabelX: number;
  exhaustLabelX: number;
  centerX: number;
  timingBar: Rect;
  body: Rect;
}

export interface CylinderLayout {
  cylinder: number;
  bank: Bank | null;
  cx: number;
  cy: number;
  r: number;
  /** Baseline of the cylinder number, in the free space at the top of the chamber. */
  labelY: number;
}

export interface SeatSlotLayout {
  /** Stable key for the slot; a seat id when the slot has a seat, otherwise its seat code. */
  key: string;
  /** Null when the head's layout has this slot but no seat record came with it. */
  seatId: string | null;
  cylinder: number;
  kind: SeatKind;
  position: number;
  code: string;
  cx: number;
  cy: number;
  r: number;
  /** Where this seat's fade sparkline goes, out on the seat's own side of the head. */
  spark: Rect;
  /** Baseline of the small figure printed under the sparkline. */
  sparkCaptionY: number;
  sparkCaptionX: number;
  sparkCaptionAnchor: "start" | "end";
}

export interface CamshaftLayout {
  label: string;
  bank: Bank | null;
  x: number;
  y1: number;
  y2: number;
  labelX: number;
  labelY: number;
}

export interface SeatMapLayout {
  width: number;
  height: number;
  viewBox: string;
  /** Narrowest the drawing may be shown and still give every seat a MIN_TOUCH_TARGET_PX target. */
  minWidthPx: number;
  blocks: BankBlockLayout[];
  cylinders: CylinderLayout[];
  seats: SeatSlotLayout[];
  camshafts: CamshaftLayout[];
}

export const SEAT_RADIUS = 24;
/** Recommended minimum for a finger target (common practice in phone interface guidelines). */
export const MIN_TOUCH_TARGET_PX = 44;
/**
 * Width the drawing gets on a 360 px phone: the shell's 12 px gutters, the map box's border
 * and padding leave about 326 px; 320 keeps a margin for browsers that reserve a scrollbar.
 */
export const PHONE_DRAWING_WIDTH_PX = 320;
/** Widest the viewBox may be so that seats still measure MIN_TOUCH_TARGET_PX at phone width. */
export const MAX_VIEWBOX_WIDTH = 344;

// Seats of one side sit in a line along the head with a clear gap between neighbours.
const SEAT_PITCH = 2 * SEAT_RADIUS + 8;
// Intake and exhaust seat centres sit this far either side of the chamber centre; the 10-unit
// channel between them is where a single overhead camshaft's line runs.
const SEAT_ACROSS = SEAT_RADIUS + 5;
const CHAMBER_PADDING = 4;
const CHAMBER_GAP = 12;
const BODY_MARGIN = 14;
const SIDE_MARGIN = 4;
const SPARK_GAP = 6;
const SPARK_MAX_WIDTH = 80;
const SPARK_HEIGHT = 24;
const TITLE_ROW = 24;
const HEADER_ROW = 18;
const TIMING_BAR = 8;
const CAM_LABEL_ROW = 14;
const BLOCK_GAP = 20;

function alongOffset(position: number, countOnSide: number): number {
  return (position - 1 - (countOnSide - 1) / 2) * SEAT_PITCH;
}

/** The smallest chamber that holds its seats, whole, with a little room round them. */
export function chamberRadius(intakeCount: number, exhaustCount: number): number {
  const most = Math.max(intakeCount, exhaustCount, 1);
  const outerAlong = alongOffset(most, most);
  return Math.ceil(Math.hypot(outerAlong, SEAT_ACROSS) + SEAT_RADIUS + CHAMBER_PADDING);
}

function camshaftXs(count: number, centerX: number, sideOffset: number): number[] {
  if (count <= 0) return [];
  if (count === 1) return [centerX];
  return Array.from(
    { length: count },
    (_, i) => centerX - sideOffset + (2 * sideOffset * i) / (count - 1),
  );
}

export function seatMapLayout(input: SeatMapLayoutInput): SeatMapLayout {
  // Seat records decide as much as the declared layout: a seat the counts do not foresee still
  // gets a place instead of vanishing from the map.
  const maxOf = (kind: SeatKind) =>
    input.seats.reduce((m, s) => (s.kind === kind ? Math.max(m, s.position) : m), 0);
  const intakeCount = Math.max(1, input.intakeValvesPerCylinder, maxOf("intake"));
  const exhaustCount = Math.max(1, input.exhaustValvesPerCylinder, maxOf("exhaust"));
  const cylinderCount = Math.max(
    1,
    input.cylinderCount,
    input.seats.reduce((m, s) => Math.max(m, s.cylinder), 0),
  );

  const R = chamberRadius(intakeCount, exhaustCount);
  const bodyHalf = R + BODY_MARGIN;
  const camSideOffset = R + BODY_MARGIN / 2;
  const sparkWidth = Math.max(
    0,
    Math.min(SPARK_MAX_WIDTH, MAX_VIEWBOX_WIDTH / 2 - bodyHalf - SPARK_GAP - SIDE_MARGIN),
  );
  const width = 2 * (bodyHalf + SPARK_GAP + sparkWidth + SIDE_MARGIN);
  const centerX = width / 2;

  const banks: (Bank | null)[] = input.arrangement === "v" ? ["A", "B"] : [null];
  const cylindersOf = (bank: Bank | null) =>
    Array.from({ length: cylinderCount }, (_, i) => i + 1).filter((c) => bankOf(input, c) === bank);

  const labels = camshaftLabels({ ...input, journalsPerCamshaft: 0 });
  const camsPerBank =
    banks.length === 1
      ? [labels.length]
      : [Math.ceil(labels.length / 2), Math.floor(labels.length / 2)];

  const seatByCode = new Map<string, SeatMapSeatRef>();
  for (const s of input.seats) {
    const code = seatCode(s);
    if (!seatByCode.has(code)) seatByCode.set(code, s);
  }

  const blocks: BankBlockLayout[] = [];
  const cylinders: CylinderLayout[] = [];
  const seats: SeatSlotLayout[] = [];
  const camshafts: CamshaftLayout[] = [];
  let y = 0;
  let labelIndex = 0;

  banks.forEach((bank, bankIndex) => {
    if (bankIndex > 0) y += BLOCK_GAP;
    let titleY: number | null = null;
    if (bank) {
      titleY = y + 16;
      y += TITLE_ROW;
    }
    const headerY = y + 12;
    y += HEADER_ROW;
    const timingBar = { x: centerX - bodyHalf, y, width: 2 * bodyHalf, height: TIMING_BAR };
    y += TIMING_BAR;
    const bodyTop = y;

    const bankCylinders = cylindersOf(bank);
    bankCylinders.forEach((cylinder, i) => {
      const cy = bodyTop + CHAMBER_PADDING * 2 + R + i * (2 * R + CHAMBER_GAP);
      cylinders.push({ cylinder, bank, cx: centerX, cy, r: R, labelY: cy - R + 15 });
      for (const kind of ["intake", "exhaust"] as const) {
        const count = kind === "intake" ? intakeCount : exhaustCount;
        const side = kind === "intake" ? -1 : 1;
        for (let position = 1; position <= count; position++) {
          const code = seatCode({ cylinder, kind, position });
          const seat = seatByCode.get(code) ?? null;
          const seatCy = cy + alongOffset(position, count);
          const sparkX = kind === "intake" ? SIDE_MARGIN : width - SIDE_MARGIN - sparkWidth;
          seats.push({
            key: seat?.id ?? code,
            seatId: seat?.id ?? null,
            cylinder,
            kind,
            position,
            code,
            cx: centerX + side * SEAT_ACROSS,
            cy: seatCy,
            r: SEAT_RADIUS,
            spark: { x: sparkX, y: seatCy - 20, width: sparkWidth, height: SPARK_HEIGHT },
            sparkCaptionY: seatCy + 17,
            sparkCaptionX: kind === "intake" ? sparkX : sparkX + sparkWidth,
            sparkCaptionAnchor: kind === "intake" ? "start" : "end",
          });
        }
      }
    });

    const lastCy =
      bodyTop +
      CHAMBER_PADDING * 2 +
      R +
      Math.max(0, bankCylinders.length - 1) * (2 * R + CHAMBER_GAP);
    const bodyBottom = lastCy + R + CHAMBER_PADDING * 2;
    const body = {
      x: centerX - bodyHalf,
      y: bodyTop,
      width: 2 * bodyHalf,
      height: bodyBottom - bodyTop,
    };

    const camCount = camsPerBank[bankIndex];
    const xs = camshaftXs(camCount, centerX, camSideOffset);
    // Two labels fit side by side under their lines; more than two are stacked so none collide.
    const stacked = camCount > 2;
    xs.forEach((x, i) => {
      camshafts.push({
        label: labels[labelIndex++],
        bank,
        x,
        y1: bodyTop + 2,
        y2: bodyBottom - 2,
        labelX: x,
        labelY: bodyBottom + CAM_LABEL_ROW + (stacked ? i * CAM_LABEL_ROW : 0),
      });
    });
    const camRows = camCount === 0 ? 0 : stacked ? camCount : 1;
    y = bodyBottom + camRows * CAM_LABEL_ROW + 4;

    blocks.push({
      bank,
      title: bank ? `Bank ${bank}` : null,
      titleY,
      headerY,
      intakeLabelX: SIDE_MARGIN,
      exhaustLabelX: width - SIDE_MARGIN,
      centerX,
      timingBar,
      body,
    });
  });

  const height = Math.ceil(y + 4);
  return {
    width,
    height,
    viewBox: `0 0 ${width} ${height}`,
    minWidthPx: Math.ceil((width * MIN_TOUCH_TARGET_PX) / (2 * SEAT_RADIUS)),
    blocks,
    cylinders,
    seats,
    camshafts,
  };
}

export interface SparklineGeometry {
  points: { x: number; y: number }[];
  /** The `points` attribute of an SVG polyline. */
  polyline: string;
  thresholdY: number;
  /** The contrasts at the top and bottom edges of the box. */
  topDb: number;
  bottomDb: number;
}

/**
 * Scales a stage's contrasts into a box: the highest contrast (or the threshold, if every stroke
 * is already below it) touches the top, and the bottom reaches down to 0 dB or the lowest
 * stroke, so the threshold line always lies inside the box and the fade reads as a fall.
 */
export function sparklineGeometry(
  contrastsDb: readonly number[],
  thresholdDb: number,
  box: Rect,
): SparklineGeometry | null {
  const values = contrastsDb.filter((v) => Number.isFinite(v));
  if (values.length === 0) return null;
  const topDb = Math.max(thresholdDb, ...values);
  const bottomDb = Math.min(0, thresholdDb, ...values);
  const span = topDb - bottomDb || 1;
  const yOf = (db: number) => box.y + ((topDb - db) / span) * box.height;
  const points = values.map((db, i) => ({
    x: values.length === 1 ? box.x + box.width : box.x + (i / (values.length - 1)) * box.width,
    y: yOf(db),
  }));
  const fmt = (n: number) => Number(n.toFixed(2));
  return {
    points,
    polyline: points.map((p) => `${fmt(p.x)},${fmt(p.y)}`).join(" "),
    thresholdY: yOf(thresholdDb),
    topDb,
    bottomDb,
  };
}
