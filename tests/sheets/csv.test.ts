// The CSV export of a head's sheets (app/api/heads/[headId]/sheets): 401 when anonymous, otherwise a parseable CSV with a header row and the recorded readings.
import Papa from "papaparse";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const sheets = await import("@/lib/heads/sheets");
const { GET } = await import("@/app/api/heads/[headId]/sheets/route");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0141");
  const ines = await h.actorOf(state.t.db, "ines@millrace.example");
  await sheets.recordJournalClearance(state.t.db, ines, {
    journalId: head.camshafts[0]!.journalIds[0]!,
    clearanceMm: 0.051,
    method: "strip",
    stripId: "narrow",
    boreMm: null,
    journalMm: null,
    enteredUnit: "mm",
    spec: null,
  });
  await sheets.recordMeasurement(state.t.db, ines, {
    jobId: head.jobId,
    kind: "deck_flatness",
    seatId: null,
    valueSi: 0.03,
    enteredUnit: "mm",
    method: null,
    spec: null,
    note: null,
  });
  const sheetId = await sheets.setUpTorqueSheet(state.t.db, ines, {
    camshaftId: head.camshafts[0]!.id,
    capCount: 5,
    boltsPerCap: 2,
    order: "centre-out",
    finalNm: 10,
    stageFractions: [0.3, 0.6, 1],
  });
  await sheets.tickBolt(state.t.db, ines, { sheetId, stage: 1, boltId: "C3-L" });
});
afterAll(async () => {
  await state.t?.cleanup();
});

const get = (headId: string) =>
  GET(new NextRequest(`http://localhost/api/heads/${headId}/sheets`), { params: Promise.resolve({ headId }) });

const COLUMNS = ["sheet", "item", "where", "value", "unit", "spec_min", "spec_max", "service_limit", "spec_source", "result", "method", "recorded_at"];

describe("GET /api/heads/[headId]/sheets", () => {
  it("answers 401 to an anonymous caller", async () => {
    state.session = null;
    const res = await get(head.headId);
    expect(res.status).toBe(401);
    expect(await res.json()).toMatchObject({ error: "unauthorized", message: "Sign in to continue." });
  });

  it("answers 400 for an id that is not a UUID and 404 for an unknown head", async () => {
    state.session = { user: { id: await h.userId(state.t!.db, "dov@millrace.example") } };
    expect((await get("not-a-head")).status).toBe(400);
    expect((await get(crypto.randomUUID())).status).toBe(404);
  });

  it("gives a CSV with a header row and the recorded readings", async () => {
    state.session = { user: { id: await h.userId(state.t!.db, "ines@millrace.example") } };
    const res = await get(head.headId);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(res.headers.get("content-disposition")).toContain("MHW-0141-sheets.csv");
    const parsed = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(COLUMNS);

    const clearance = parsed.data.find((r) => r.sheet === "journal clearance");
    // Demo figures (invented demo data, db/seed.ts): 0.035–0.072 mm, limit 0.1 mm.
    expect(clearance).toMatchObject({
      where: "Intake camshaft, journal 1",
      value: "0.051",
      unit: "mm",
      spec_min: "0.035",
      spec_max: "0.072",
      service_limit: "0.1",
      spec_source: "library",
      result: "within_spec",
      method: "strip",
    });
    // Demo figure (invented demo data, db/seed.ts): deck flatness at most 0.05 mm.
    expect(parsed.data.find((r) => r.item === "Deck flatness (warp)")).toMatchObject({ sheet: "measurement", where: "Head", value: "0.03", result: "within_spec" });

    const torque = parsed.data.filter((r) => r.sheet === "cap torque");
    // 5 caps × 2 bolts × 3 stages.
    expect(torque).toHaveLength(30);
    expect(torque.filter((r) => r.result === "ticked").map((r) => [r.where, r.value])).toEqual([["C3-L", "3"]]);
    expect(torque.every((r) => r.spec_source === "library")).toBe(true);
  });
});
