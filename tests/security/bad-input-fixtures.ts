// The world the bad-input corpus runs in: the demo shop, a second shop with records of its own
// (so that ids can be tried across shops), a lapping session started by a technician, and the
// fingerprints taken before and after each refused request (every table of the public schema,
// and every file in the storage directory).
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import bcrypt from "bcryptjs";
import { and, eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { customers, engineSpecs, jobs, mailOutbox, seats, shops, users, valves } from "@/db/schema";
import { startSession } from "@/lib/bench/service";
import { createHeadWithSeats } from "@/lib/heads/create";
import { DEFAULT_HEAD_LAYOUT } from "@/lib/heads/layout";
import { setUpTorqueSheet } from "@/lib/heads/sheets";
import { addSeatPhoto } from "@/lib/storage/photos";
import { storeRecording } from "@/lib/storage/recording-upload";
import { actorOf, demoHead } from "../sheets/helpers";
import { jpegHead, wavFile } from "../storage/fixtures";

export const INES = "ines@millrace.example";
export const DOV = "dov@millrace.example";
export const RHEA = "rhea@millrace.example";
export const ADMIN = "admin@millrace.example";
/** The second shop's people. */
export const QUILL = "quill@ferrule.example";
export const WREN = "wren@ferrule.example";

export interface HeadIds {
  jobId: string;
  headId: string;
  camshaftId: string;
  journalId: string;
  seats: Map<string, string>;
  valveIn: Map<string, string>;
}

export interface Fixtures {
  users: Map<string, string>;
  /** MHW-0141, at the bench with Ines. */
  own: HeadIds;
  /** MHW-0143, awaiting audit. */
  audit: HeadIds;
  /** A session Ines started on MHW-0141 seat 4I1, with a recording. */
  inesSession: string;
  /** A session Ines started on a job assigned to nobody, which any technician may work on. */
  openJob: HeadIds & { inesSession: string };
  ownSpecId: string;
  /** A seat of MHW-0151, a job of Rhea's shop already signed off. */
  signedOff: { jobId: string; seatId: string };
  /** Everything of the second shop, Ferrule Lane Engines. */
  other: HeadIds & {
    shopId: string;
    customerId: string;
    specId: string;
    sessionId: string;
    photoId: string;
    sheetId: string;
    mailId: string;
  };
}

/** The demo head's ids, from the sheets tests' reader, with its valves by seat code. */
async function headIds(db: Db, jobNumber: string): Promise<HeadIds> {
  const head = await demoHead(db, jobNumber);
  const valveRows = await db.select().from(valves).where(eq(valves.headId, head.headId));
  const codeOf = new Map([...head.seatByCode].map(([code, id]) => [id, code]));
  return {
    jobId: head.jobId,
    headId: head.headId,
    camshaftId: head.camshafts[0]!.id,
    journalId: head.camshafts[0]!.journalIds[0]!,
    seats: head.seatByCode,
    valveIn: new Map(valveRows.filter((v) => v.seatId).map((v) => [codeOf.get(v.seatId!)!, v.id])),
  };
}

const once = (bytes: Uint8Array): ReadableStream<Uint8Array> =>
  new ReadableStream({
    start(c) {
      c.enqueue(bytes);
      c.close();
    },
  });

/** Builds the second shop and the records the corpus aims at; run once on a freshly seeded database. */
export async function buildFixtures(db: Db): Promise<Fixtures> {
  const [shop] = await db.insert(shops).values({ name: "Ferrule Lane Engines" }).returning();
  const hash = await bcrypt.hash("not-used-here-1", 4);
  await db.insert(users).values([
    { shopId: shop!.id, email: QUILL, name: "Quill Armitage", role: "supervisor", passwordHash: hash },
    { shopId: shop!.id, email: WREN, name: "Wren Okafor", role: "technician", passwordHash: hash },
  ]);
  const wren = await actorOf(db, WREN);
  const quill = await actorOf(db, QUILL);
  const [customer] = await db.insert(customers).values({ shopId: shop!.id, name: "Bramble Haulage" }).returning();
  const [spec] = await db.insert(engineSpecs).values({ shopId: shop!.id, name: "Kestle K20 2.0 16V" }).returning();
  const [job] = await db
    .insert(jobs)
    .values({
      shopId: shop!.id,
      number: "FLE-0141",
      customerId: customer!.id,
      engineDescription: "Kestle K20 2.0 inline-4, twin cam, 16 valves",
      status: "at_bench",
      assignedTechnicianId: wren.id,
      engineSpecId: spec!.id,
    })
    .returning();
  await createHeadWithSeats(db, job!.id, "Cylinder head", DEFAULT_HEAD_LAYOUT);
  const other = await headIds(db, "FLE-0141");
  const otherSession = randomUUID();
  await startSession(db, wren, other.seats.get("1I1")!, { sessionId: otherSession, stage: "coarse", deviceId: "phone-wren-1" });
  const photo = await addSeatPhoto(db, wren, other.seats.get("1I1")!, once(jpegHead));
  const sheetId = await setUpTorqueSheet(db, quill, {
    jobId: other.jobId,
    camshaftId: other.camshaftId,
    capCount: 5,
    boltsPerCap: 2,
    order: "centre-out",
    finalNm: 10,
    stageFractions: [0.5, 1],
  });
  const [mail] = await db
    .insert(mailOutbox)
    .values({
      jobId: other.jobId,
      kind: "head_report",
      recipients: ["office@bramble.example"],
      subject: "FLE-0141 head report",
      html: "<p>report</p>",
      text: "report",
      status: "failed",
      attempts: 5,
      failures: 5,
      lastError: "connection refused",
      createdById: quill.id,
    })
    .returning();

  const ines = await actorOf(db, INES);
  const own = await headIds(db, "MHW-0141");
  const inesSession = randomUUID();
  await startSession(db, ines, own.seats.get("4I1")!, { sessionId: inesSession, stage: "coarse", deviceId: "phone-ines-1" });
  await storeRecording(db, ines, inesSession, once(wavFile));
  const [first] = await db.select().from(jobs).where(eq(jobs.number, "MHW-0141"));
  const [openJob] = await db
    .insert(jobs)
    .values({ shopId: ines.shopId, number: "MHW-0150", customerId: first!.customerId, engineDescription: "Tor T14 1.4 inline-4, single cam, 8 valves", status: "at_bench" })
    .returning();
  await createHeadWithSeats(db, openJob!.id, "Cylinder head", {
    arrangement: "inline",
    cylinderCount: 4,
    intakeValvesPerCylinder: 1,
    exhaustValvesPerCylinder: 1,
    camshaftCount: 1,
    journalsPerCamshaft: 5,
  });
  const open = await headIds(db, "MHW-0150");
  // A settled seat with no done-checks: approving it needs a reason.
  await db.update(seats).set({ state: "settled" }).where(eq(seats.id, open.seats.get("1I1")!));
  const [closedJob] = await db
    .insert(jobs)
    .values({ shopId: ines.shopId, number: "MHW-0151", customerId: first!.customerId, engineDescription: "Tor T14 1.4 inline-4, single cam, 8 valves", status: "signed_off" })
    .returning();
  const closedHead = await createHeadWithSeats(db, closedJob!.id, "Cylinder head", {
    arrangement: "inline",
    cylinderCount: 1,
    intakeValvesPerCylinder: 1,
    exhaustValvesPerCylinder: 1,
    camshaftCount: 0,
    journalsPerCamshaft: 0,
  });
  const openSession = randomUUID();
  await startSession(db, ines, open.seats.get("2I1")!, { sessionId: openSession, stage: "coarse", deviceId: "phone-ines-1" });
  const [ownSpec] = await db
    .select({ id: engineSpecs.id })
    .from(engineSpecs)
    .where(and(eq(engineSpecs.shopId, ines.shopId)))
    .limit(1);

  const userRows = await db.select({ id: users.id, email: users.email }).from(users);
  return {
    users: new Map(userRows.map((u) => [u.email, u.id])),
    own,
    audit: await headIds(db, "MHW-0143"),
    inesSession,
    openJob: { ...open, inesSession: openSession },
    ownSpecId: ownSpec!.id,
    signedOff: { jobId: closedJob!.id, seatId: closedHead.seats[0]!.id },
    other: {
      ...other,
      shopId: shop!.id,
      customerId: customer!.id,
      specId: spec!.id,
      sessionId: otherSession,
      photoId: photo.id,
      sheetId,
      mailId: mail!.id,
    },
  };
}

export interface TablePrint {
  rows: number;
  md5: string;
}

/**
 * Row count and an md5 of every row's text, for every table of the public schema. The list of
 * tables is read from the catalogue, so a table added later is covered without touching this.
 */
export async function databasePrint(db: Db): Promise<Record<string, TablePrint>> {
  const listed = await db.execute(
    sql`select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by table_name`,
  );
  const names = (listed as unknown as { rows: Array<{ table_name: string }> }).rows.map((r) => r.table_name);
  if (names.length === 0) throw new Error("no tables in the public schema");
  const parts = names.map((name) => {
    const ident = `"${name.replaceAll('"', '""')}"`;
    const literal = `'${name.replaceAll("'", "''")}'`;
    return `select ${literal} as name, count(*)::int as rows, md5(coalesce(string_agg(t::text, E'\\n' order by t::text), '')) as md5 from public.${ident} t`;
  });
  const res = await db.execute(sql.raw(parts.join(" union all ")));
  const out: Record<string, TablePrint> = {};
  for (const r of (res as unknown as { rows: Array<{ name: string; rows: number; md5: string }> }).rows) {
    out[r.name] = { rows: Number(r.rows), md5: r.md5 };
  }
  return out;
}

/** Every file under the storage directory with its size, temporary part files included. */
export function storagePrint(dir: string): Record<string, number> {
  const out: Record<string, number> = {};
  const walk = (d: string) => {
    if (!fs.existsSync(d)) return;
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out[path.relative(dir, p)] = fs.statSync(p).size;
    }
  };
  walk(dir);
  return out;
}
