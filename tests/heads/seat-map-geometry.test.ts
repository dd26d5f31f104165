// The seat map's geometry over every head layout the schema accepts: each seat placed once,
// nothing overlapping or off the drawing, sides and banks where the bench expects them, full-size
// touch targets on a phone, and sparklines scaled so the fade and the threshold both show.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { SeatMap, seatAccessibleName, type SeatMapSeat } from "@/components/heads/seat-map";
import {
  camshaftLabels,
  headLayoutSchema,
  seatPositions,
  type HeadLayout,
} from "@/lib/heads/layout";
import {
  MAX_VIEWBOX_WIDTH,
  MIN_TOUCH_TARGET_PX,
  PHONE_DRAWING_WIDTH_PX,
  seatMapLayout,
  sparklineGeometry,
  type SeatMapLayout,
} from "@/lib/heads/seat-map-geometry";

function allLayouts(): HeadLayout[] {
  const out: HeadLayout[] = [];
  for (const arrangement of ["inline", "v"] as const) {
    for (let cylinderCount = 1; cylinderCount <= 16; cylinderCount++) {
      for (let intake = 1; intake <= 3; intake++) {
        for (let exhaust = 1; exhaust <= 3; exhaust++) {
          for (let camshaftCount = 0; camshaftCount <= 4; camshaftCount++) {
            const layout = {
              arrangement,
              cylinderCount,
              intakeValvesPerCylinder: intake,
              exhaustValvesPerCylinder: exhaust,
              camshaftCount,
              journalsPerCamshaft: camshaftCount === 0 ? 0 : 5,
            };
            if (headLayoutSchema.safeParse(layout).success) out.push(layout);
          }
        }
      }
    }
  }
  return out;
}

const LAYOUTS = allLayouts();

function seatsFor(layout: HeadLayout) {
  return seatPositions(layout).map((p) => ({
    ...p,
    id: `seat-${p.cylinder}-${p.kind}-${p.position}`,
  }));
}

function mapFor(layout: HeadLayout): SeatMapLayout {
  return seatMapLayout({ ...layout, seats: seatsFor(layout) });
}

const name = (l: HeadLayout) =>
  `${l.arrangement} ${l.cylinderCount} cyl, ${l.intakeValvesPerCylinder}I/${l.exhaustValvesPerCylinder}E, ${l.camshaftCount} cams`;

describe("seatMapLayout over every valid head layout", () => {
  it("covers the schema's whole range", () => {
    // 16 inline counts and 8 even V counts, 3×3 valve choices, 5 camshaft counts.
    expect(LAYOUTS).toHaveLength((16 + 8) * 9 * 5);
  });

  it("places every seat exactly once, and no empty slots when all seats are recorded", () => {
    for (const layout of LAYOUTS) {
      const seats = seatsFor(layout);
      const map = mapFor(layout);
      expect(map.seats, name(layout)).toHaveLength(seats.length);
      for (const s of seats) {
        expect(
          map.seats.filter((slot) => slot.seatId === s.id),
          name(layout),
        ).toHaveLength(1);
      }
      expect(
        map.seats.every((slot) => slot.seatId !== null),
        name(layout),
      ).toBe(true);
    }
  });

  it("never overlaps two seat circles", () => {
    for (const layout of LAYOUTS) {
      const { seats } = mapFor(layout);
      const overlaps: string[] = [];
      for (let i = 0; i < seats.length; i++) {
        for (let j = i + 1; j < seats.length; j++) {
          const a = seats[i];
          const b = seats[j];
          if (Math.hypot(a.cx - b.cx, a.cy - b.cy) < a.r + b.r)
            overlaps.push(`${name(layout)}: ${a.code} / ${b.code}`);
        }
      }
      expect(overlaps).toEqual([]);
    }
  });

  it("keeps seats, chambers, bodies and sparklines inside the viewBox", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      const inside = (x: number, y: number) =>
        x >= 0 && y >= 0 && x <= map.width && y <= map.height;
      for (const s of map.seats) {
        expect(
          inside(s.cx - s.r, s.cy - s.r) && inside(s.cx + s.r, s.cy + s.r),
          `${name(layout)} ${s.code}`,
        ).toBe(true);
        expect(
          inside(s.spark.x, s.spark.y) && inside(s.spark.x + s.spark.width, s.sparkCaptionY),
          `${name(layout)} ${s.code} spark`,
        ).toBe(true);
      }
      for (const c of map.cylinders) {
        expect(inside(c.cx - c.r, c.cy - c.r) && inside(c.cx + c.r, c.cy + c.r), name(layout)).toBe(
          true,
        );
      }
      for (const b of map.blocks) {
        expect(
          inside(b.body.x, b.body.y) && inside(b.body.x + b.body.width, b.body.y + b.body.height),
          name(layout),
        ).toBe(true);
      }
      expect(map.viewBox).toBe(`0 0 ${map.width} ${map.height}`);
    }
  });

  it("keeps each seat inside its own chamber", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      for (const s of map.seats) {
        const c = map.cylinders.find((cyl) => cyl.cylinder === s.cylinder)!;
        expect(
          Math.hypot(s.cx - c.cx, s.cy - c.cy) + s.r,
          `${name(layout)} ${s.code}`,
        ).toBeLessThanOrEqual(c.r);
      }
    }
  });

  it("keeps sparklines clear of the head, outboard on their seat's own side", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      const body = map.blocks[0].body;
      for (const s of map.seats) {
        expect(s.spark.width, name(layout)).toBeGreaterThanOrEqual(48);
        if (s.kind === "intake") expect(s.spark.x + s.spark.width).toBeLessThan(body.x);
        else expect(s.spark.x).toBeGreaterThan(body.x + body.width);
      }
      // Sparklines on one side never overlap each other (caption included).
      for (const kind of ["intake", "exhaust"] as const) {
        const boxes = map.seats
          .filter((s) => s.kind === kind)
          .sort((a, b) => a.spark.y - b.spark.y);
        for (let i = 1; i < boxes.length; i++) {
          expect(boxes[i].spark.y, name(layout)).toBeGreaterThan(boxes[i - 1].sparkCaptionY);
        }
      }
    }
  });

  it("puts intake and exhaust seats on opposite sides of every cylinder", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      for (const c of map.cylinders) {
        const own = map.seats.filter((s) => s.cylinder === c.cylinder);
        const intake = own.filter((s) => s.kind === "intake");
        const exhaust = own.filter((s) => s.kind === "exhaust");
        expect(intake.length).toBe(layout.intakeValvesPerCylinder);
        expect(exhaust.length).toBe(layout.exhaustValvesPerCylinder);
        expect(Math.max(...intake.map((s) => s.cx)), name(layout)).toBeLessThan(c.cx);
        expect(Math.min(...exhaust.map((s) => s.cx)), name(layout)).toBeGreaterThan(c.cx);
      }
      // The side labels stand over the same sides.
      for (const b of map.blocks) {
        expect(b.intakeLabelX).toBeLessThan(b.centerX);
        expect(b.exhaustLabelX).toBeGreaterThan(b.centerX);
      }
    }
  });

  it("numbers cylinders away from the timing end, cylinder 1 nearest it", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      for (const block of map.blocks) {
        const own = map.cylinders
          .filter((c) => c.bank === block.bank)
          .sort((a, b) => a.cylinder - b.cylinder);
        for (const c of own)
          expect(c.cy - c.r, name(layout)).toBeGreaterThan(
            block.timingBar.y + block.timingBar.height,
          );
        for (let i = 1; i < own.length; i++)
          expect(own[i].cy, name(layout)).toBeGreaterThan(own[i - 1].cy);
        // Position 1 of each side is the seat nearest the timing end within its cylinder.
        for (const c of own) {
          for (const kind of ["intake", "exhaust"] as const) {
            const side = map.seats.filter((s) => s.cylinder === c.cylinder && s.kind === kind);
            const nearest = side.reduce((a, b) => (b.cy < a.cy ? b : a));
            expect(nearest.position).toBe(1);
          }
        }
      }
      const nearestOverall = map.cylinders.reduce((a, b) => (b.cy < a.cy ? b : a));
      expect(nearestOverall.cylinder).toBe(1);
    }
  });

  it("puts a V head's odd cylinders on bank A and even ones on bank B, as separate blocks", () => {
    for (const layout of LAYOUTS.filter((l) => l.arrangement === "v")) {
      const map = mapFor(layout);
      expect(map.blocks.map((b) => b.title)).toEqual(["Bank A", "Bank B"]);
      for (const c of map.cylinders) expect(c.bank).toBe(c.cylinder % 2 === 1 ? "A" : "B");
      const [a, b] = map.blocks;
      expect(b.timingBar.y, name(layout)).toBeGreaterThan(a.body.y + a.body.height);
      for (const c of map.cylinders) {
        const block = c.bank === "A" ? a : b;
        expect(c.cy - c.r).toBeGreaterThanOrEqual(block.body.y);
        expect(c.cy + c.r).toBeLessThanOrEqual(block.body.y + block.body.height);
      }
    }
    for (const layout of LAYOUTS.filter((l) => l.arrangement === "inline")) {
      const map = mapFor(layout);
      expect(map.blocks).toHaveLength(1);
      expect(map.blocks[0].title).toBeNull();
      expect(map.cylinders.every((c) => c.bank === null)).toBe(true);
    }
  });

  it("gives every seat a full-size touch target at phone width, without sideways scrolling", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      expect(map.width, name(layout)).toBeLessThanOrEqual(MAX_VIEWBOX_WIDTH);
      const scale = PHONE_DRAWING_WIDTH_PX / map.width;
      for (const s of map.seats)
        expect(2 * s.r * scale, name(layout)).toBeGreaterThanOrEqual(MIN_TOUCH_TARGET_PX);
      // Below minWidthPx the box scrolls sideways instead; a phone-width drawing never needs to.
      expect(map.minWidthPx, name(layout)).toBeLessThanOrEqual(PHONE_DRAWING_WIDTH_PX);
      expect((2 * map.seats[0].r * map.minWidthPx) / map.width).toBeGreaterThanOrEqual(
        MIN_TOUCH_TARGET_PX,
      );
    }
  });

  it("draws each camshaft along its bank with the layout's own camshaft names", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      expect(
        map.camshafts.map((c) => c.label),
        name(layout),
      ).toEqual(camshaftLabels(layout));
      const perBlock = new Map<string, number>();
      for (const cam of map.camshafts) {
        const block = map.blocks.find((b) => b.bank === cam.bank)!;
        perBlock.set(String(cam.bank), (perBlock.get(String(cam.bank)) ?? 0) + 1);
        expect(cam.x).toBeGreaterThan(block.body.x);
        expect(cam.x).toBeLessThan(block.body.x + block.body.width);
        expect(cam.y1).toBeGreaterThanOrEqual(block.body.y);
        expect(cam.y2).toBeLessThanOrEqual(block.body.y + block.body.height);
        // A label about 0.6 em per character, 10 units high, stays on the drawing.
        const half = (cam.label.length * 6) / 2;
        expect(cam.labelX - half, `${name(layout)} ${cam.label}`).toBeGreaterThanOrEqual(0);
        expect(cam.labelX + half, `${name(layout)} ${cam.label}`).toBeLessThanOrEqual(map.width);
        expect(cam.labelY).toBeGreaterThan(block.body.y + block.body.height);
        expect(cam.labelY).toBeLessThanOrEqual(map.height);
      }
      // With one or two camshafts per bank (every real head) the lines run clear of the seats.
      for (const [bank, count] of perBlock) {
        if (count > 2) continue;
        const cams = map.camshafts.filter((c) => String(c.bank) === bank);
        const seats = map.seats.filter(
          (s) => String(map.cylinders.find((c) => c.cylinder === s.cylinder)!.bank) === bank,
        );
        for (const cam of cams)
          for (const s of seats)
            expect(Math.abs(cam.x - s.cx), name(layout)).toBeGreaterThan(s.r + 2);
      }
    }
  });

  it("keeps camshaft labels that share a row apart", () => {
    for (const layout of LAYOUTS) {
      const map = mapFor(layout);
      for (let i = 0; i < map.camshafts.length; i++) {
        for (let j = i + 1; j < map.camshafts.length; j++) {
          const a = map.camshafts[i];
          const b = map.camshafts[j];
          if (a.bank !== b.bank || a.labelY !== b.labelY) continue;
          const gap =
            Math.abs(a.labelX - b.labelX) - (a.label.length * 6) / 2 - (b.label.length * 6) / 2;
          expect(gap, `${name(layout)}: ${a.label} / ${b.label}`).toBeGreaterThan(0);
        }
      }
    }
  });
});

describe("seatMapLayout with incomplete or unexpected seat records", () => {
  const layout: HeadLayout = {
    arrangement: "inline",
    cylinderCount: 2,
    intakeValvesPerCylinder: 2,
    exhaustValvesPerCylinder: 2,
    camshaftCount: 2,
    journalsPerCamshaft: 5,
  };

  it("leaves an empty slot where the layout has a seat that was not recorded", () => {
    const seats = seatsFor(layout).filter(
      (s) => !(s.cylinder === 2 && s.kind === "exhaust" && s.position === 2),
    );
    const map = seatMapLayout({ ...layout, seats });
    const empty = map.seats.filter((s) => s.seatId === null);
    expect(empty.map((s) => s.code)).toEqual(["2E2"]);
  });

  it("still places a seat the declared counts do not foresee", () => {
    const seats = [
      ...seatsFor(layout),
      { id: "extra", cylinder: 3, kind: "intake" as const, position: 3 },
    ];
    const map = seatMapLayout({ ...layout, seats });
    const extra = map.seats.find((s) => s.seatId === "extra");
    expect(extra).toBeDefined();
    expect(map.cylinders.map((c) => c.cylinder)).toEqual([1, 2, 3]);
  });
});

describe("sparklineGeometry", () => {
  const box = { x: 10, y: 20, width: 80, height: 24 };

  it("maps the highest contrast to the top and 0 dB to the bottom", () => {
    const g = sparklineGeometry([9, 6, 4, 2.5, 1.6, 1.2, 1.1], 1.5, box)!;
    expect(g.points[0].y).toBeCloseTo(box.y);
    expect(g.topDb).toBe(9);
    expect(g.bottomDb).toBe(0);
    expect(g.points[0].x).toBe(box.x);
    expect(g.points[g.points.length - 1].x).toBe(box.x + box.width);
    // 1.5 dB of 9 dB: 5/6 of the way down.
    expect(g.thresholdY).toBeCloseTo(box.y + (7.5 / 9) * box.height);
  });

  it("keeps the threshold line and every point inside the box", () => {
    const cases: number[][] = [
      [12, 8, 5],
      [0.4, 0.3, 0.2],
      [3, -0.5, -1.2],
      [1.5, 1.5],
      [0, 0, 0],
    ];
    for (const values of cases) {
      const g = sparklineGeometry(values, 1.5, box)!;
      expect(g.thresholdY, values.join()).toBeGreaterThanOrEqual(box.y);
      expect(g.thresholdY, values.join()).toBeLessThanOrEqual(box.y + box.height);
      for (const p of g.points) {
        expect(p.y, values.join()).toBeGreaterThanOrEqual(box.y - 1e-9);
        expect(p.y, values.join()).toBeLessThanOrEqual(box.y + box.height + 1e-9);
      }
    }
  });

  it("puts the threshold at the top when every stroke is already below it", () => {
    const g = sparklineGeometry([1.2, 0.9, 0.8], 1.5, box)!;
    expect(g.thresholdY).toBeCloseTo(box.y);
    expect(g.points[0].y).toBeGreaterThan(box.y);
  });

  it("reaches below 0 dB when a stroke does, so the lowest stroke sits on the bottom", () => {
    const g = sparklineGeometry([4, 1, -1], 1.5, box)!;
    expect(g.points[2].y).toBeCloseTo(box.y + box.height);
  });

  it("draws a single stroke at the right-hand end, and nothing for no strokes", () => {
    const g = sparklineGeometry([5], 1.5, box)!;
    expect(g.points).toEqual([{ x: box.x + box.width, y: box.y }]);
    expect(sparklineGeometry([], 1.5, box)).toBeNull();
    expect(sparklineGeometry([Number.NaN], 1.5, box)).toBeNull();
    expect(sparklineGeometry([3, Number.NaN, 2], 1.5, box)!.points).toHaveLength(2);
  });
});

describe("SeatMap markup", () => {
  const layout: HeadLayout = {
    arrangement: "v",
    cylinderCount: 4,
    intakeValvesPerCylinder: 2,
    exhaustValvesPerCylinder: 1,
    camshaftCount: 4,
    journalsPerCamshaft: 4,
  };
  const states = ["waiting", "lapping", "settled", "stalled", "approved", "sent_back"] as const;
  const seats: SeatMapSeat[] = seatsFor(layout).map((s, i) => ({
    ...s,
    state: states[i % states.length],
    contrastsDb: i % 2 === 0 ? [] : [8, 5, 3, 1.4, 1.2],
    valveTag: i === 0 ? null : `${s.cylinder}${s.kind === "intake" ? "I" : "E"}${s.position}`,
  }));

  it("names a seat by cylinder, side, state and valve", () => {
    const seat: SeatMapSeat = {
      id: "x",
      cylinder: 3,
      kind: "exhaust",
      position: 1,
      state: "settled",
      contrastsDb: [],
      valveTag: "3E1",
    };
    expect(seatAccessibleName(seat)).toBe("Cylinder 3 exhaust 1, settled, valve 3E1");
    expect(seatAccessibleName({ ...seat, valveTag: null, contrastsDb: [6, 2, 1.24] })).toBe(
      "Cylinder 3 exhaust 1, settled, no valve tagged, 3 strokes, latest 1.2 dB",
    );
  });

  it("renders every seat as a link to its bench screen, with the drawing's labels", () => {
    const html = renderToStaticMarkup(createElement(SeatMap, { ...layout, seats }));
    for (const s of seats) expect(html).toContain(`href="/bench/${s.id}"`);
    expect(html.match(/<a /g)).toHaveLength(seats.length);
    for (const text of [
      "Timing end",
      "Intake side",
      "Exhaust side",
      "Bank A",
      "Bank B",
      "Bank A intake",
      "Bank B exhaust",
    ]) {
      expect(html).toContain(`>${text}<`);
    }
    expect(html).toContain('aria-label="Cylinder 1 intake 1, waiting, no valve tagged"');
    // One sparkline per seat with strokes.
    expect(html.match(/<polyline/g)).toHaveLength(
      seats.filter((s) => s.contrastsDb.length > 1).length,
    );
  });

  it("uses the caller's links when given", () => {
    const html = renderToStaticMarkup(
      createElement(SeatMap, { ...layout, seats, hrefFor: (id: string) => `/jobs/j1/seats/${id}` }),
    );
    expect(html).toContain(`href="/jobs/j1/seats/${seats[0].id}"`);
    expect(html).not.toContain('href="/bench/');
  });
});
