// The audit trail in words: every action the code writes has a sentence, unknown ones read in a
// plain form, before/after read as a short diff with units, and bursts group as one line.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import {
  AUDIT_WORDS,
  changeText,
  describeEntry,
  describeGroup,
  diffEntry,
  entryText,
  groupBursts,
  hasWords,
  partsText,
  type AuditEntryFacts,
} from "@/lib/review/audit-words";

const ROOT = join(__dirname, "..", "..");

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return sourceFiles(path);
    return /\.(ts|tsx)$/.test(name) ? [path] : [];
  });
}

/**
 * Every action string the code writes: on a line that sets `action:` (recordAudit's input, the
 * seed's insert) or passes one to a helper that writes the entry (`toBench(…, "job.taken_back", …)`).
 * The words table itself is left out, or it would find its own keys.
 */
function writtenActions(): Map<string, string> {
  const found = new Map<string, string>();
  const files = [...sourceFiles(join(ROOT, "lib")), join(ROOT, "db", "seed.ts")].filter((f) => !f.endsWith(join("review", "audit-words.ts")));
  for (const file of files) {
    const lines = readFileSync(file, "utf8").split("\n");
    lines.forEach((line, i) => {
      if (!/\baction\s*[:=]|toBench\(|recordAudit\(/.test(line)) return;
      for (const m of line.matchAll(/["'`]([a-z][a-z_]*\.[a-z][a-z_]*)["'`]/g)) found.set(m[1]!, `${file.slice(ROOT.length + 1)}:${i + 1}`);
    });
  }
  return found;
}

let nextId = 1;
const T0 = Date.parse("2026-12-05T14:00:00.000Z");
function entry(over: Partial<AuditEntryFacts> & { action: string }, secondsAfter = 0): AuditEntryFacts {
  return {
    id: nextId++,
    at: new Date(T0 + secondsAfter * 1000).toISOString(),
    actorId: "rhea",
    actorName: "Rhea Castellan",
    entityType: "seat",
    entityId: "seat-4e1",
    jobId: "job-143",
    jobNumber: "MHW-0143",
    seatCode: null,
    before: null,
    after: null,
    ...over,
  };
}

describe("every action has words", () => {
  const written = writtenActions();

  it("finds the actions the code writes (the scan itself works)", () => {
    // A sample from each writer: reviews, hand-in's helper, sheets, bench, photos, people, the seed.
    for (const a of ["seat.approved", "job.taken_back", "job.back_to_bench", "measurement.recorded", "torque.ticked", "seat.state_changed", "seat.photo_added", "person.deactivated", "job.created"]) {
      expect(written.has(a), a).toBe(true);
    }
    expect(written.size).toBeGreaterThanOrEqual(30);
  });

  it("gives each of them a sentence of its own", () => {
    const missing = [...written].filter(([a]) => !hasWords(a)).map(([a, where]) => `${a} (${where})`);
    expect(missing, "actions written without words in lib/review/audit-words.ts").toEqual([]);
  });

  it("no sentence shows a raw code or JSON, even with an empty payload", () => {
    for (const action of Object.keys(AUDIT_WORDS)) {
      const text = entryText(entry({ action }));
      expect(text, action).not.toMatch(/[{}"]|\b[a-z]+_[a-z]+\b|undefined|null/);
      expect(text, action).not.toContain(action);
      // No gap where a missing value would have gone, no placeholder.
      expect(text, action).not.toMatch(/ {2}| \?|\s$|\ban? an?\b/);
    }
  });
});

describe("sentences", () => {
  it("a seat decision names the person, the seat and the job", () => {
    const e = entry({ action: "seat.approved", seatCode: "4E1", before: { seat: "4E1", state: "settled" }, after: { seat: "4E1", state: "approved", comment: "Even grey ring" } });
    expect(entryText(e)).toBe("Rhea Castellan approved seat 4E1 on MHW-0143");
  });

  it("the job and, for a seat's own entries, the seat are links", () => {
    const e = entry({ action: "seat.sent_back", seatCode: "2I1", entityId: "seat-2i1" });
    expect(describeEntry(e)).toEqual([
      "Rhea Castellan sent back seat ",
      { seat: { id: "seat-2i1", code: "2I1", jobId: "job-143" } },
      " on ",
      { job: { id: "job-143", number: "MHW-0143" } },
    ]);
    // A session names its seat by code only: no link to a seat it has no id for.
    const s = entry({ action: "session.started", entityType: "lapping_session", entityId: "sess-1", after: { seat: "2I1", stage: "coarse" } });
    expect(describeEntry(s).filter((p) => typeof p !== "string")).toEqual([{ job: { id: "job-143", number: "MHW-0143" } }]);
    expect(entryText(s)).toBe("Rhea Castellan started lapping seat 2I1 on MHW-0143 with coarse compound");
  });

  it("a journal clearance reads with its journal and its value in mm", () => {
    const e = entry({
      action: "measurement.recorded",
      actorName: "Ines Marlow",
      entityType: "measurement",
      jobNumber: "MHW-0141",
      after: { kind: "journal_clearance", camshaft: "Intake camshaft", journal: 3, valueMm: 0.046, method: "strip", offScale: false, verdict: "good" },
    });
    expect(entryText(e)).toBe("Ines Marlow saved journal 3 clearance 0.046 mm on MHW-0141");
  });

  it("an entry with nobody signed in reads 'Someone'", () => {
    const e = entry({ action: "customer_link.opened", actorId: null, actorName: null, entityType: "customer_link", entityId: "link-1" });
    expect(entryText(e)).toBe("Someone opened the customer's report link for MHW-0143");
  });

  it("an action without words reads in a plain form, never its payload", () => {
    const e = entry({ action: "gasket.torqued_twice", entityType: "gasket", after: { nested: { deep: [1, 2] }, note: "x" } });
    const text = entryText(e);
    expect(text).toBe("Rhea Castellan: gasket torqued twice, MHW-0143");
    expect(text).not.toMatch(/[{}[\]"]/);
    const noJob = entry({ action: "shop.repainted", entityType: "shop", jobId: null, jobNumber: null });
    expect(entryText(noJob)).toBe("Rhea Castellan: shop repainted");
  });

  it("a person's entries name them from the shop's people", () => {
    const names = new Map([["u-ines", "Ines Marlow"]]);
    const e = entry({ action: "user.role_changed", entityType: "user", entityId: "u-ines", jobId: null, jobNumber: null, before: { role: "technician" }, after: { role: "supervisor" } });
    expect(entryText(e, names)).toBe("Rhea Castellan made Ines Marlow a supervisor");
    expect(diffEntry(e, names).map(changeText)).toEqual(["role: Technician → Supervisor"]);
  });
});

describe("before and after as a short diff", () => {
  it("a new comment reads from a dash; a changed state in its words", () => {
    const e = entry({
      action: "seat.approved",
      before: { seat: "4E1", state: "settled" },
      after: { seat: "4E1", state: "approved", comment: "Seat face looks even" },
    });
    expect(diffEntry(e).map(changeText)).toEqual(["state: Settled → Approved", "comment: — → 'Seat face looks even'"]);
  });

  it("a seat's state change reads Lapping → Settled, with its stage and strokes", () => {
    const e = entry({ action: "seat.state_changed", before: { state: "lapping" }, after: { state: "settled", stage: "fine", verdict: "settled", strokes: 14 } });
    const text = diffEntry(e).map(changeText);
    expect(text[0]).toBe("state: Lapping → Settled");
    expect(text).toContain("stage: — → fine compound");
    expect(text).toContain("strokes: — → 14");
  });

  it("values carry their units: mm, N·m, N", () => {
    const edit = entry({ action: "measurement.edited", entityType: "measurement", before: { valueMm: 0.051, method: "strip" }, after: { kind: "journal_clearance", journal: 2, valueMm: 0.046, method: "diameters" } });
    expect(diffEntry(edit).map(changeText)).toEqual(["value: 0.051 mm → 0.046 mm", "method: gauge strip → bore minus journal diameter"]);
    const spring = entry({ action: "measurement.recorded", entityType: "measurement", after: { kind: "spring_load", valueSi: 412.5, method: null, verdict: "within_spec", specSource: "library" } });
    expect(diffEntry(spring).map(changeText)).toEqual(["value: — → 412.5 N", "verdict: — → Within spec", "figure from: — → the specifications library"]);
    const tick = entry({ action: "torque.ticked", entityType: "torque_sheet", after: { bolt: "C3-L", stage: 2, nm: 10 } });
    expect(entryText(tick)).toBe("Rhea Castellan ticked bolt C3-L at stage 2 (10 N·m) on MHW-0143");
    expect(diffEntry(tick).map(changeText)).toEqual(["stage: — → 2", "torque: — → 10 N·m"]);
  });

  it("a specification figure carries its unit; torque stages read as percentages of the final torque", () => {
    const fig = entry({ action: "spec.figure_saved", entityType: "engine_spec", jobId: null, jobNumber: null, before: { key: "journal_clearance", min: 0.035, max: 0.072, limit: 0.1, nominal: null }, after: { key: "journal_clearance", min: 0.04, max: 0.072, limit: 0.1, nominal: null } });
    expect(entryText(fig)).toBe("Rhea Castellan saved figures for camshaft journal oil clearance in the specifications library");
    expect(diffEntry(fig).map(changeText)).toEqual(["minimum: 0.035 mm → 0.04 mm"]);
    const sheet = entry({ action: "torque_sheet.changed", entityType: "torque_sheet", before: { finalNm: 10, stageFractions: [0.5, 1] }, after: { finalNm: 12, stageFractions: [0.3, 0.6, 1] } });
    expect(diffEntry(sheet).map(changeText)).toEqual(["final torque: 10 N·m → 12 N·m", "stages: 50 %, 100 % → 30 %, 60 %, 100 %"]);
  });

  it("leaves out what did not change, ids, and never writes JSON for nested values", () => {
    const e = entry({
      action: "job.status_changed",
      entityType: "job",
      before: { status: "at_bench" },
      after: { status: "awaiting_audit", unfinished: { seats: ["3I1", "3E1"], journals: 2 }, sheetId: "abc" },
    });
    const text = diffEntry(e).map(changeText);
    expect(text[0]).toBe("status: At the bench → Awaiting audit");
    expect(text.join(" ")).not.toMatch(/[{}"]|abc/);
    expect(text[1]).toBe("unfinished: — → seats 3I1, 3E1; journals 2");
    const same = entry({ action: "valve.identified", entityType: "valve", before: { tag: "2I2", partNumber: null, serial: null }, after: { tag: "2I2", partNumber: null, serial: "S-7" } });
    expect(diffEntry(same).map(changeText)).toEqual(["serial number: — → S-7"]);
  });

  it("a technician id reads as their name", () => {
    const names = new Map([["u-dov", "Dov Achterberg"], ["u-ines", "Ines Marlow"]]);
    const e = entry({ action: "job.edited", entityType: "job", before: { technician: "u-dov", promisedOn: "2026-12-10" }, after: { technician: "u-ines", promisedOn: "2026-12-10", layoutChanged: false } });
    expect(diffEntry(e, names).map(changeText)).toEqual(["technician: Dov Achterberg → Ines Marlow", "layout changed: — → no"]);
  });
});

describe("bursts", () => {
  const approvals = (n: number, gapSeconds: number, over: Partial<AuditEntryFacts> = {}) =>
    // Newest first, as the trail lists them.
    Array.from({ length: n }, (_, i) => entry({ action: "seat.approved", jobId: "job-144", jobNumber: "MHW-0144", ...over }, (n - 1 - i) * gapSeconds));

  it("eight approvals within a minute read as one line", () => {
    const groups = groupBursts(approvals(8, 5));
    expect(groups).toHaveLength(1);
    expect(groups[0]!.entries).toHaveLength(8);
    expect(partsText(describeGroup(groups[0]!))).toBe("Rhea Castellan approved 8 seats on MHW-0144");
  });

  it("60 s apart still joins; 61 s apart is two lines", () => {
    expect(groupBursts(approvals(2, 60))).toHaveLength(1);
    expect(groupBursts(approvals(2, 61))).toHaveLength(2);
    // The gap is between neighbours, not from the first: a steady 50 s pace keeps one burst.
    expect(groupBursts(approvals(4, 50))).toHaveLength(1);
  });

  it("another person's entry in between breaks the burst", () => {
    const list = approvals(3, 5);
    const dov = entry({ action: "seat.approved", actorId: "dov", actorName: "Dov Achterberg", jobId: "job-144", jobNumber: "MHW-0144" }, 6);
    const groups = groupBursts([list[0]!, dov, list[1]!, list[2]!]);
    expect(groups.map((g) => g.entries.length)).toEqual([1, 1, 2]);
  });

  it("another kind of action or another job breaks it too", () => {
    const [a, b, c] = approvals(3, 5);
    const other = { ...b!, action: "seat.sent_back" };
    expect(groupBursts([a!, other, c!]).map((g) => g.entries.length)).toEqual([1, 1, 1]);
    const otherJob = { ...b!, jobId: "job-145", jobNumber: "MHW-0145" };
    expect(groupBursts([a!, otherJob, c!]).map((g) => g.entries.length)).toEqual([1, 1, 1]);
  });

  it("a burst of an action with no plural words still reads as one line", () => {
    const list = Array.from({ length: 3 }, (_, i) => entry({ action: "shop.updated", entityType: "shop", jobId: null, jobNumber: null }, 2 - i));
    const [g] = groupBursts(list);
    expect(partsText(describeGroup(g!))).toBe("Rhea Castellan updated the shop's details — 3 entries like this");
  });
});
