// The role matrix for server actions, in-process on a fresh PGlite with the demo seed: every
// exported action of every "use server" module is called as each persona of
// tests/security/role-matrix.ts with a plausible form, and answers what the matrix says. A refusal
// leaves the whole database (every table's rows, hashed) and the blob store as they were; an
// allowed call changes them. A second shop shows that neither actions nor route handlers reach
// another shop's records.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { Db } from "@/db/client";
import { customers, engineSpecs, heads, jobs, mailOutbox, seats, shops, users } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import {
  ACTION_MATRIX,
  PERSONAS,
  ROUTE_MATRIX,
  TARGET_JOB,
  type ActionOutcome,
  type Persona,
} from "./role-matrix";
import { ROOT, listRouteHandlers, listServerActions, type HttpMethod } from "./route-tree";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
// Storage reads its directory on first use; this test gets one of its own.
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-matrix-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { initialActionState } = await import("@/lib/actions/state");
const { forbiddenMessage } = await import("@/lib/auth/guard");
const { enqueueMail } = await import("@/lib/mail/outbox");
const { getTorqueSheets, setUpTorqueSheet, tickBolt } = await import("@/lib/heads/sheets");
const { startSession } = await import("@/lib/bench/service");
const { addSeatPhoto } = await import("@/lib/storage/photos");
const { storeRecording } = await import("@/lib/storage/recording-upload");
const { encodeWav } = await import("@/lib/audio");
const h = await import("../sheets/helpers");

type ActionState = import("@/lib/actions/state").ActionState;
type AnyFn = (...args: unknown[]) => Promise<unknown>;

// Every "use server" module found on disk, loaded by its path: a new module is exercised here
// (and fails below until it has cases) without anyone having to import it by hand.
const ACTIONS = listServerActions();
const actionModules = new Map<string, Record<string, unknown>>();
for (const file of new Set(ACTIONS.map((a) => a.file)))
  actionModules.set(file, await import(path.join(ROOT, file)));
const action = (key: string): AnyFn => {
  const [file, name] = key.split("#") as [string, string];
  return actionModules.get(file)![name] as AnyFn;
};

// ---------------------------------------------------------------- the shop and its people

type Caller = Persona | "otherShopSupervisor" | "otherShopAdmin";
const EMAIL: Record<Exclude<Caller, "anonymous">, string> = {
  technicianOwnJob: "ines@millrace.example",
  technicianOtherJob: "ines@millrace.example",
  supervisor: "rhea@millrace.example",
  admin: "admin@millrace.example",
  otherShopSupervisor: "quill@ferrule.example",
  otherShopAdmin: "wren@ferrule.example",
};

const db = (): Db => state.t!.db;
let userIds: Map<string, string>;
let otherShopId: string;
const demo = {} as Record<
  "MHW-0141" | "MHW-0142",
  Awaited<ReturnType<typeof h.demoHead>> & { number: string }
>;
let vardaSpecId: string;

function signInAs(who: Caller): void {
  state.session = who === "anonymous" ? null : { user: { id: userIds.get(EMAIL[who])! } };
}

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(db());
  // A second shop with a supervisor and an admin of its own, to show that ids do not cross shops.
  const [other] = await db().insert(shops).values({ name: "Ferrule Lane Engines" }).returning();
  otherShopId = other!.id;
  await db()
    .insert(users)
    .values([
      {
        shopId: otherShopId,
        email: EMAIL.otherShopSupervisor,
        name: "Quill Armitage",
        role: "supervisor",
        passwordHash: "not-used-here",
      },
      {
        shopId: otherShopId,
        email: EMAIL.otherShopAdmin,
        name: "Wren Halloway",
        role: "admin",
        passwordHash: "not-used-here",
      },
    ]);
  userIds = new Map(
    (await db().select({ id: users.id, email: users.email }).from(users)).map((u) => [
      u.email,
      u.id,
    ]),
  );
  for (const number of ["MHW-0141", "MHW-0142"] as const)
    demo[number] = { ...(await h.demoHead(db(), number)), number };
  vardaSpecId = (
    await db().select().from(engineSpecs).where(eq(engineSpecs.name, "Varda VX18 1.8 16V"))
  )[0]!.id;
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

// ---------------------------------------------------------------- what "nothing changed" means

let tableQuery: ReturnType<typeof sql.join> | null = null;

/** Every public table's row count and a hash of its rows, and every file in the blob store. */
async function fingerprint(): Promise<Record<string, string>> {
  if (!tableQuery) {
    const tables = (await db().execute(
      sql`select table_name as name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by 1`,
    )) as unknown as { rows: Array<{ name: string }> };
    // One statement for all tables: a row per table with its count and the md5 of its rows as text.
    tableQuery = sql.join(
      tables.rows.map(
        ({ name }) =>
          sql`select ${name}::text as name, count(*)::int as n, md5(coalesce(string_agg(t::text, '|' order by t::text), '')) as h from ${sql.identifier(name)} t`,
      ),
      sql` union all `,
    );
  }
  const res = (await db().execute(tableQuery)) as unknown as {
    rows: Array<{ name: string; n: number; h: string }>;
  };
  const out: Record<string, string> = Object.fromEntries(
    res.rows.map((r) => [r.name, `${r.n}:${r.h}`]),
  );
  const walk = (dir: string): string[] =>
    fs.existsSync(dir)
      ? fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
          const abs = path.join(dir, e.name);
          return e.isDirectory()
            ? walk(abs)
            : [`${path.relative(dataDir, abs)}:${fs.statSync(abs).size}`];
        })
      : [];
  out["(blob store)"] = walk(dataDir).sort().join(",");
  return out;
}

// ---------------------------------------------------------------- the answers an action may give

const SIGN_IN = "Sign in to continue.";
const PERMISSIONS = [
  "jobs:read",
  "jobs:work",
  "jobs:audit",
  "jobs:manage",
  "specs:manage",
  "users:manage",
] as const;
/** The refusals the app gives for a role or an assignment (lib/auth/guard.ts, job-access.ts, review/service.ts). */
const isRoleRefusal = (message: string) =>
  PERMISSIONS.some((p) => forbiddenMessage(p) === message) ||
  /^Job [A-Z]+-\d+ is assigned to another technician\. Ask a supervisor to reassign it\.$/.test(
    message,
  ) ||
  /^Only a supervisor can sign off, send back or reopen work/.test(message);
/** How a record of another shop is answered: exactly as one that does not exist. */
const NOT_IN_SHOP =
  /(does not exist in your shop|not in your shop|does not exist on this head|has no head in your shop|not in your library|of this shop)/;

function expectOutcome(res: ActionState, outcome: ActionOutcome | "own-shop"): void {
  switch (outcome) {
    case "ok":
    case "own-shop":
      expect(res, res.message ?? "").toMatchObject({ ok: true });
      return;
    case "unauthorized":
      expect(res).toMatchObject({ ok: false, message: SIGN_IN });
      return;
    case "forbidden":
      expect(res.ok).toBe(false);
      expect(
        isRoleRefusal(res.message ?? ""),
        `a refusal for the role or the assignment, got: ${res.message}`,
      ).toBe(true);
      return;
    case "not-found":
      expect(res.ok).toBe(false);
      expect(res.message).toMatch(NOT_IN_SHOP);
      return;
  }
}

// ---------------------------------------------------------------- one plausible call per action

interface CaseContext {
  caller: Caller;
  job: (typeof demo)["MHW-0141"];
  /** A number of its own for every call, for unique names. */
  n: number;
}
/** Arranges the records the call needs (before the fingerprint is taken) and returns the call. */
type Case = (c: CaseContext) => Promise<() => Promise<unknown>>;

const form = h.form;
const prev = initialActionState;
const seatOf = (c: CaseContext, code: string) => c.job.seatByCode.get(code)!;
const setSeat = (id: string, state: (typeof seats.$inferSelect)["state"]) =>
  db().update(seats).set({ state }).where(eq(seats.id, id));
const setJob = (id: string, status: (typeof jobs.$inferSelect)["status"]) =>
  db().update(jobs).set({ status }).where(eq(jobs.id, id));
const isTechnician = (c: Caller) => c === "technicianOwnJob" || c === "technicianOtherJob";

async function throwawayPerson(n: number): Promise<string> {
  const [u] = await db()
    .insert(users)
    .values({
      shopId: (await h.actorOf(db(), EMAIL.admin)).shopId,
      email: `matrix-${n}@millrace.example`,
      name: `Matrix Person ${n}`,
      role: "technician",
      passwordHash: "not-used-here",
    })
    .returning({ id: users.id });
  return u!.id;
}

async function throwawayEngine(n: number): Promise<string> {
  const [spec] = await db()
    .insert(engineSpecs)
    .values({ shopId: (await h.actorOf(db(), EMAIL.admin)).shopId, name: `Matrix engine to keep ${n}` })
    .returning({ id: engineSpecs.id });
  return spec!.id;
}

async function failedMail(c: CaseContext): Promise<string> {
  const id = await enqueueMail(db(), {
    kind: "head_report",
    jobId: c.job.jobId,
    recipients: ["workshop@corrinvale.example"],
    subject: `Report ${c.n}`,
    html: "<p>x</p>",
    text: "x",
  });
  await db().update(mailOutbox).set({ status: "failed", attempts: 5, failures: 5 }).where(eq(mailOutbox.id, id));
  return id;
}

/** A live customer's link to the job's report, as a sign-off would have made it. */
async function liveCustomerLink(c: CaseContext): Promise<string> {
  const { createCustomerLink } = await import("@/lib/report/customer-links");
  const link = await createCustomerLink(db(), { jobId: c.job.jobId, createdById: userIds.get(EMAIL.supervisor)! });
  return link.id;
}

/** A torque sheet on the head's second camshaft, with its next expected bolt. */
async function torqueSheet(c: CaseContext) {
  const camshaft = c.job.camshafts[1]!;
  let view = (
    await getTorqueSheets(db(), (await h.actorOf(db(), EMAIL.supervisor)).shopId, c.job.jobId)
  ).camshafts.find((x) => x.id === camshaft.id)!.sheet;
  if (!view) {
    await setUpTorqueSheet(db(), await h.actorOf(db(), EMAIL.supervisor), {
      jobId: c.job.jobId,
      camshaftId: camshaft.id,
      capCount: camshaft.journalIds.length,
      boltsPerCap: 2,
      order: "centre-out",
      finalNm: 10,
      stageFractions: [0.5, 1],
    });
    view = (
      await getTorqueSheets(db(), (await h.actorOf(db(), EMAIL.supervisor)).shopId, c.job.jobId)
    ).camshafts.find((x) => x.id === camshaft.id)!.sheet!;
  }
  return { sheetId: view.id, next: view.next! };
}

/** The job form as the job stands, with a new note: the same layout, technician and customer. */
async function jobFormAsItIs(c: CaseContext) {
  const [job] = await db().select().from(jobs).where(eq(jobs.id, c.job.jobId));
  const [head] = await db().select().from(heads).where(eq(heads.jobId, c.job.jobId));
  return {
    customerId: job!.customerId,
    newCustomerName: "",
    engineDescription: job!.engineDescription,
    engineSpecId: job!.engineSpecId ?? "",
    promisedOn: job!.promisedOn ?? "",
    assignedTechnicianId: job!.assignedTechnicianId ?? "",
    notes: `Checked by the role matrix, call ${c.n}.`,
    headLabel: head!.label,
    arrangement: head!.arrangement,
    cylinderCount: head!.cylinderCount,
    intakeValvesPerCylinder: head!.intakeValvesPerCylinder,
    exhaustValvesPerCylinder: head!.exhaustValvesPerCylinder,
    camshaftCount: head!.camshaftCount,
    journalsPerCamshaft: head!.journalsPerCamshaft,
  };
}

const CASES: Record<string, Case> = {
  "lib/actions/done-checks.ts#saveDoneCheck": async (c) => {
    return () =>
      action("lib/actions/done-checks.ts#saveDoneCheck")(
        prev,
        form({ seatId: seatOf(c, "4I1"), kind: "leak_test", result: "pass", note: `Dry, call ${c.n}.` }),
      );
  },
  "lib/actions/jobs.ts#createJob": async (c) => {
    // Another shop may book in for itself, but not with this shop's technician on the job.
    const assignedTechnicianId = c.caller.startsWith("otherShop")
      ? userIds.get(EMAIL.technicianOwnJob)!
      : "";
    return () =>
      action("lib/actions/jobs.ts#createJob")(
        h.jobForm({ newCustomerName: `Matrix Haulage ${c.n}`, assignedTechnicianId }),
      );
  },
  "lib/actions/jobs.ts#updateJob": async (c) => {
    const values = await jobFormAsItIs(c);
    return () => action("lib/actions/jobs.ts#updateJob")(c.job.jobId, values);
  },
  "lib/actions/jobs.ts#changeJobStatus": async (c) => {
    // Technicians hand a job in for audit; supervisors and admins send it back to the queue.
    const to = isTechnician(c.caller) || c.caller === "anonymous" ? "awaiting_audit" : "queued";
    return () =>
      action("lib/actions/jobs.ts#changeJobStatus")(prev, form({ jobId: c.job.jobId, to, confirmUnfinished: "yes" }));
  },
  "lib/actions/jobs.ts#takeHeadBack": async (c) => {
    // Handed in, and no seat judged since: the audit has not started.
    await setJob(c.job.jobId, "awaiting_audit");
    return () => action("lib/actions/jobs.ts#takeHeadBack")(prev, form({ jobId: c.job.jobId }));
  },
  "lib/actions/mail.ts#retryMailAction": async (c) => {
    const id = await failedMail(c);
    return () => action("lib/actions/mail.ts#retryMailAction")(prev, form({ id }));
  },
  "lib/actions/review.ts#submitSeatReview": async (c) => {
    const seatId = seatOf(c, "1I1");
    await setSeat(seatId, "settled");
    return () =>
      action("lib/actions/review.ts#submitSeatReview")(
        prev,
        form({
          seatId,
          jobId: c.job.jobId,
          decision: "approved",
          comment: "Even grey ring all round.",
          // No done-checks are recorded on this seat, so an approval gives its reason.
          checksReason: "Checked with the head assembled.",
        }),
      );
  },
  "lib/actions/review.ts#submitApproveSettled": async (c) => {
    const seatId = seatOf(c, "3E1");
    await setSeat(seatId, "settled");
    return () => {
      const f = form({ jobId: c.job.jobId, comment: "", checksReason: "Checked with the head assembled." });
      f.append("seatIds", seatId);
      return action("lib/actions/review.ts#submitApproveSettled")(prev, f);
    };
  },
  "lib/actions/review.ts#submitSeatReopen": async (c) => {
    const seatId = seatOf(c, "1E1");
    await setSeat(seatId, "approved");
    return () =>
      action("lib/actions/review.ts#submitSeatReopen")(
        prev,
        form({ seatId, jobId: c.job.jobId, reason: "Customer asked for a recheck." }),
      );
  },
  "lib/actions/review.ts#submitHeadReview": async (c) => {
    await setJob(c.job.jobId, "awaiting_audit");
    return () =>
      action("lib/actions/review.ts#submitHeadReview")(
        prev,
        form({
          jobId: c.job.jobId,
          decision: "sent_back",
          comment: "Cylinder 2 needs another pass.",
        }),
      );
  },
  "lib/actions/review.ts#submitCustomerLinkRevoke": async (c) => {
    const linkId = await liveCustomerLink(c);
    return () => action("lib/actions/review.ts#submitCustomerLinkRevoke")(prev, form({ jobId: c.job.jobId, linkId }));
  },
  "lib/actions/review.ts#submitHeadReopen": async (c) => {
    await setJob(c.job.jobId, "signed_off");
    return () =>
      action("lib/actions/review.ts#submitHeadReopen")(
        prev,
        form({ jobId: c.job.jobId, reason: "Warranty claim on cylinder 3." }),
      );
  },
  "lib/actions/sheets.ts#saveClearanceReading": async (c) => {
    const journalId = c.job.camshafts[0]!.journalIds[0]!;
    return () =>
      action("lib/actions/sheets.ts#saveClearanceReading")(
        prev,
        form({
          jobId: c.job.jobId,
          journalId,
          method: "strip",
          stripId: "narrow",
          value: "0.051",
          unit: "mm",
        }),
      );
  },
  "lib/actions/sheets.ts#saveMeasurement": async (c) => {
    return () =>
      action("lib/actions/sheets.ts#saveMeasurement")(
        prev,
        form({ jobId: c.job.jobId, kind: "deck_flatness", value: "0.03", unit: "mm" }),
      );
  },
  "lib/actions/sheets.ts#saveSeatMeasurements": async (c) => {
    return () =>
      action("lib/actions/sheets.ts#saveSeatMeasurements")(
        prev,
        form({ jobId: c.job.jobId, seatId: seatOf(c, "1I1"), seat_contact_width: "1.3", "seat_contact_width.unit": "mm" }),
      );
  },
  "lib/actions/sheets.ts#saveTorqueSetup": async (c) => {
    const camshaft = c.job.camshafts[0]!;
    return () =>
      action("lib/actions/sheets.ts#saveTorqueSetup")(
        prev,
        form({
          jobId: c.job.jobId,
          camshaftId: camshaft.id,
          capCount: String(camshaft.journalIds.length),
          boltsPerCap: "2",
          orderMode: "centre-out",
          finalTorque: "10",
          finalTorqueUnit: "N·m",
        }),
      );
  },
  "lib/actions/sheets.ts#saveTick": async (c) => {
    const { sheetId, next } = await torqueSheet(c);
    return () =>
      action("lib/actions/sheets.ts#saveTick")(
        prev,
        form({ jobId: c.job.jobId, sheetId, stage: String(next.stage), boltId: next.boltId }),
      );
  },
  "lib/actions/sheets.ts#undoLastTick": async (c) => {
    // A tick made by the supervisor; each allowed call undoes it.
    const { sheetId, next } = await torqueSheet(c);
    await tickBolt(db(), await h.actorOf(db(), EMAIL.supervisor), { jobId: c.job.jobId, sheetId, ...next });
    return () =>
      action("lib/actions/sheets.ts#undoLastTick")(
        prev,
        form({ jobId: c.job.jobId, sheetId, stage: String(next.stage), boltId: next.boltId, reason: "Ticked the wrong bolt." }),
      );
  },
  "lib/actions/sheets.ts#saveValveIdentity": async (c) => {
    const valve = await h.valveIn(db(), c.job, "3I1");
    return () =>
      action("lib/actions/sheets.ts#saveValveIdentity")(
        prev,
        form({
          jobId: c.job.jobId,
          valveId: valve.id,
          tag: valve.tag,
          partNumber: `VX-${c.n}`,
          serial: "",
        }),
      );
  },
  "lib/actions/sheets.ts#saveValveMove": async (c) => {
    // Two valves not yet lapped in swap seats; each allowed call swaps them again.
    const valve = await h.valveIn(db(), c.job, "4E1");
    return () =>
      action("lib/actions/sheets.ts#saveValveMove")(
        prev,
        form({ jobId: c.job.jobId, valveId: valve.id, toSeatId: seatOf(c, "4E2") }),
      );
  },
  "lib/actions/specs.ts#createEngineSpec": async (c) => {
    return () =>
      action("lib/actions/specs.ts#createEngineSpec")(
        prev,
        form({ name: `Matrix engine ${c.n}`, source: "Invented for the role matrix" }),
      );
  },
  "lib/actions/specs.ts#saveSpecFigure": async (c) => {
    return () =>
      action("lib/actions/specs.ts#saveSpecFigure")(
        prev,
        form({
          engineSpecId: vardaSpecId,
          key: "deck_flatness",
          max: `0.0${(c.n % 5) + 3}`,
          limit: "0.1",
        }),
      );
  },
  "lib/actions/specs.ts#saveJobOverride": async (c) => {
    return () =>
      action("lib/actions/specs.ts#saveJobOverride")(
        prev,
        form({
          jobId: c.job.jobId,
          key: "deck_flatness",
          max: `0.0${(c.n % 5) + 3}`,
          limit: "0.1",
          reason: "Head was skimmed before.",
        }),
      );
  },
  "lib/actions/customers.ts#createCustomer": async (c) => {
    return () =>
      action("lib/actions/customers.ts#createCustomer")(
        prev,
        form({ name: `Matrix Customer ${c.n}`, contactName: "Oda Brink", email: `orders-${c.n}@matrix.example`, phone: "01632 960 777", address: "" }),
      );
  },
  "lib/actions/customers.ts#updateCustomer": async (c) => {
    // The customer of the persona's job, with a phone number of this call's own.
    const [job] = await db().select({ customerId: jobs.customerId }).from(jobs).where(eq(jobs.id, c.job.jobId));
    const [customer] = await db().select().from(customers).where(eq(customers.id, job!.customerId));
    return () =>
      action("lib/actions/customers.ts#updateCustomer")(
        prev,
        form({ id: customer!.id, name: customer!.name, contactName: customer!.contactName ?? "", email: customer!.email ?? "", phone: `01632 960 ${String(c.n).padStart(3, "0")}`, address: customer!.address ?? "" }),
      );
  },
  "lib/actions/shop.ts#updateShopSettings": async (c) => {
    // The caller's own shop, its name kept and its phone changed: the action only ever writes the caller's shop.
    const shopName = c.caller.startsWith("otherShop") ? "Ferrule Lane Engines" : "Millrace Head Works";
    const [shop] = await db().select().from(shops).where(eq(shops.name, shopName));
    return () =>
      action("lib/actions/shop.ts#updateShopSettings")(
        prev,
        form({ name: shop!.name, address: shop!.address ?? "", phone: `01632 961 ${String(c.n).padStart(3, "0")}`, timeZone: shop!.timeZone }),
      );
  },
  "lib/actions/specs.ts#renameEngineSpec": async (c) => {
    const id = await throwawayEngine(c.n);
    return () => action("lib/actions/specs.ts#renameEngineSpec")(prev, form({ id, name: `Matrix engine renamed ${c.n}` }));
  },
  "lib/actions/specs.ts#setEngineSpecRetired": async (c) => {
    const id = await throwawayEngine(c.n);
    return () => action("lib/actions/specs.ts#setEngineSpecRetired")(prev, form({ id, retired: "true" }));
  },
  "lib/actions/users.ts#createUser": async (c) => {
    return () =>
      action("lib/actions/users.ts#createUser")({
        name: `Matrix Hire ${c.n}`,
        email: `hire-${c.n}@millrace.example`,
        role: "technician",
        password: "Brass-Lapping-Ring-2049!",
      });
  },
  "lib/actions/users.ts#resetPassword": async (c) => {
    const id = await throwawayPerson(c.n);
    return () =>
      action("lib/actions/users.ts#resetPassword")(
        prev,
        form({ id, password: "Another-Long-Phrase-7731!" }),
      );
  },
  "lib/actions/users.ts#changeRole": async (c) => {
    const id = await throwawayPerson(c.n);
    return () => action("lib/actions/users.ts#changeRole")(prev, form({ id, role: "supervisor" }));
  },
  "lib/actions/users.ts#setActive": async (c) => {
    const id = await throwawayPerson(c.n);
    return () => action("lib/actions/users.ts#setActive")(prev, form({ id, active: "false" }));
  },
  "lib/actions/users.ts#endSessions": async (c) => {
    const id = await throwawayPerson(c.n);
    return () => action("lib/actions/users.ts#endSessions")(prev, form({ id }));
  },
};

let calls = 0;
/** Every case starts from open jobs: both demo jobs at the bench. */
async function baseline(): Promise<void> {
  for (const j of Object.values(demo)) await setJob(j.jobId, "at_bench");
}

async function run(key: string, caller: Caller, job: keyof typeof demo) {
  await baseline();
  const call = await CASES[key]!({ caller, job: demo[job], n: ++calls });
  signInAs(caller);
  const before = await fingerprint();
  const res = (await call()) as ActionState;
  const after = await fingerprint();
  signInAs("anonymous");
  return { res, before, after };
}

/** Refused personas first, so each allowed change comes after every refusal was checked. */
const refusedFirst = (row: Record<Persona, ActionOutcome>) =>
  [...PERSONAS].sort((a, b) => Number(row[a] === "ok") - Number(row[b] === "ok"));

describe("server actions × personas", () => {
  beforeEach(() => signInAs("anonymous"));

  for (const { file, name } of ACTIONS) {
    const key = `${file}#${name}`;
    const row = ACTION_MATRIX[key];
    describe(key, () => {
      it("has a matrix row and a case here", () => {
        expect(row, "row in tests/security/role-matrix.ts").toBeDefined();
        expect(CASES[key], "case in this file").toBeDefined();
        expect(typeof action(key)).toBe("function");
      });
      if (!row || !CASES[key]) return;
      for (const p of refusedFirst(row)) {
        it(`${p}: ${row[p]}`, async () => {
          const { res, before, after } = await run(key, p, TARGET_JOB[p]);
          expectOutcome(res, row[p]);
          if (row[p] === "ok")
            expect(after, "an allowed call makes its change").not.toEqual(before);
          else expect(after, "a refused call changes nothing").toEqual(before);
        });
      }
      // The other shop's caller is the one its own shop would let act: an admin for people and
      // mail, a supervisor for everything else.
      const other: Caller = /users\.ts|mail\.ts|shop\.ts/.test(file)
        ? "otherShopAdmin"
        : "otherShopSupervisor";
      it(`another shop's ${other === "otherShopAdmin" ? "admin" : "supervisor"}: ${row.otherShop}`, async () => {
        const { res, before, after } = await run(key, other, "MHW-0142");
        expectOutcome(res, row.otherShop);
        if (row.otherShop === "not-found") {
          expect(after, "a refused call changes nothing").toEqual(before);
        } else {
          // What it made belongs to its own shop.
          const made = key.endsWith("#createCustomer")
            ? await db()
                .select({ shopId: customers.shopId })
                .from(customers)
                .where(eq(customers.name, `Matrix Customer ${calls}`))
            : key.endsWith("#updateShopSettings")
            ? await db()
                .select({ shopId: shops.id })
                .from(shops)
                .where(eq(shops.phone, `01632 961 ${String(calls).padStart(3, "0")}`))
            : key.endsWith("#createUser")
            ? await db()
                .select({ shopId: users.shopId })
                .from(users)
                .where(eq(users.email, `hire-${calls}@millrace.example`))
            : await db()
                .select({ shopId: engineSpecs.shopId })
                .from(engineSpecs)
                .where(eq(engineSpecs.name, `Matrix engine ${calls}`));
          expect(made).toEqual([{ shopId: otherShopId }]);
        }
      });
    });
  }
});

// ---------------------------------------------------------------- route handlers, another shop

describe("route handlers, for another shop's supervisor", () => {
  // This shop's records on Dov's job, made by its supervisor.
  const mine = {} as { headId: string; seatId: string; sessionId: string; photoId: string };
  const png = Buffer.from(
    "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==",
    "base64",
  );
  // A copy on an ArrayBuffer of its own, as a request body must be.
  const wav = new Uint8Array(
    encodeWav(
      [
        Float32Array.from(
          { length: 1600 },
          (_, i) => 0.25 * Math.sin((2 * Math.PI * 440 * i) / 8000),
        ),
      ],
      8000,
    ),
  );
  const stream = (bytes: Uint8Array<ArrayBuffer>) => new Response(bytes).body!;

  beforeAll(async () => {
    const rhea = await h.actorOf(db(), EMAIL.supervisor);
    const job = demo["MHW-0142"];
    mine.headId = job.headId;
    mine.seatId = job.seatByCode.get("2I1")!;
    mine.sessionId = randomUUID();
    await baseline();
    await startSession(db(), rhea, mine.seatId, {
      sessionId: mine.sessionId,
      stage: "coarse",
      deviceId: "matrix-rhea-phone",
    });
    await storeRecording(db(), rhea, mine.sessionId, stream(wav));
    mine.photoId = (await addSeatPhoto(db(), rhea, mine.seatId, stream(png))).id;
  });

  /** The request each route gets, naming this shop's records. */
  const REQUESTS: Record<
    string,
    () => { path: string; headers?: Record<string, string>; body?: BodyInit }
  > = {
    "GET /api/jobs": () => ({ path: "/api/jobs" }),
    "GET /api/audit": () => ({ path: "/api/audit" }),
    "GET /api/audit/csv": () => ({ path: "/api/audit/csv" }),
    "GET /api/heads/[headId]/sheets": () => ({ path: `/api/heads/${mine.headId}/sheets` }),
    "GET /api/photos/[photoId]": () => ({ path: `/api/photos/${mine.photoId}` }),
    "GET /api/seats/[seatId]": () => ({ path: `/api/seats/${mine.seatId}` }),
    "GET /api/seats/[seatId]/photos": () => ({ path: `/api/seats/${mine.seatId}/photos` }),
    "GET /api/seats/[seatId]/checks": () => ({ path: `/api/seats/${mine.seatId}/checks` }),
    "POST /api/seats/[seatId]/photos": () => ({
      path: `/api/seats/${mine.seatId}/photos`,
      headers: { "content-type": "image/png" },
      body: png,
    }),
    "POST /api/seats/[seatId]/sessions": () => ({
      path: `/api/seats/${mine.seatId}/sessions`,
      headers: { "content-type": "application/json" },
      body: JSON.stringify({
        sessionId: randomUUID(),
        stage: "coarse",
        deviceId: "ferrule-phone-1",
      }),
    }),
    "POST /api/sessions/[sessionId]/end": () => ({ path: `/api/sessions/${mine.sessionId}/end` }),
    "POST /api/sessions/[sessionId]/strokes": () => ({
      path: `/api/sessions/${mine.sessionId}/strokes`,
      headers: { "content-type": "application/json" },
      body: JSON.stringify({
        strokes: [
          {
            clientId: randomUUID(),
            index: 1,
            startS: 2,
            endS: 3.4,
            onsetDb: -21,
            bodyDb: -30,
            contrastDb: 9,
            flags: [],
          },
        ],
      }),
    }),
    "GET /api/sessions/[sessionId]/recording": () => ({
      path: `/api/sessions/${mine.sessionId}/recording`,
    }),
    "PUT /api/sessions/[sessionId]/recording": () => ({
      path: `/api/sessions/${mine.sessionId}/recording`,
      headers: { "content-type": "audio/wav" },
      body: wav,
    }),
    "GET /api/sessions/[sessionId]/recording/chunks": () => ({
      path: `/api/sessions/${mine.sessionId}/recording/chunks`,
    }),
    "HEAD /api/sessions/[sessionId]/recording/chunks": () => ({
      path: `/api/sessions/${mine.sessionId}/recording/chunks`,
    }),
    "PUT /api/sessions/[sessionId]/recording/chunks": () => ({
      path: `/api/sessions/${mine.sessionId}/recording/chunks`,
      headers: {
        "content-type": "application/octet-stream",
        "content-range": `bytes 0-${wav.byteLength - 1}/${wav.byteLength}`,
      },
      body: wav,
    }),
  };

  /** The path's values for the pattern's dynamic segments: what Next.js hands the handler as params. */
  function paramsOf(pattern: string, urlPath: string): Record<string, string> {
    const names = pattern.split("/");
    const values = urlPath.split("/");
    return Object.fromEntries(
      names.flatMap((seg, i) => (/^\[\w+\]$/.test(seg) ? [[seg.slice(1, -1), values[i]!]] : [])),
    );
  }

  for (const { file, pattern, methods } of listRouteHandlers()) {
    for (const method of methods) {
      const key = `${method} ${pattern}`;
      const expected = ROUTE_MATRIX[key]?.otherShop;
      if (expected === undefined || expected === "n/a") continue;
      it(`${key}: ${expected}`, async () => {
        const build = REQUESTS[key];
        expect(build, "request in this file").toBeDefined();
        const handler = (
          (await import(path.join(ROOT, file))) as Record<
            HttpMethod,
            (req: NextRequest, ctx: unknown) => Promise<Response>
          >
        )[method];
        const r = build!();
        const req = new NextRequest(`http://grindfade.test${r.path}`, {
          method,
          headers: r.headers,
          body: r.body,
        });
        signInAs("otherShopSupervisor");
        const before = await fingerprint();
        const res = await handler(req, { params: Promise.resolve(paramsOf(pattern, r.path)) });
        const after = await fingerprint();
        signInAs("anonymous");
        if (expected === 404) {
          expect(res.status).toBe(404);
          if (method !== "HEAD") expect(await res.json()).toMatchObject({ error: "not_found" });
        } else {
          // A list of the caller's own shop: none of this shop's jobs, people or entries.
          expect(res.status).toBe(200);
          const text = await res.text();
          for (const j of Object.values(demo)) {
            expect(text).not.toContain(j.jobId);
            expect(text).not.toContain(j.number);
          }
          expect(text).not.toContain(userIds.get(EMAIL.supervisor)!);
        }
        expect(after, "another shop's call changes nothing here").toEqual(before);
      });
    }
  }
});
