// The invented demo scenario: Millrace Head Works, a small cylinder-head shop, with three
// customers and heads on the bench. Everything here is made up for the demo; no real people,
// shops or engines. Seeding runs only on an empty database, so it is safe to call every start.
import bcrypt from "bcryptjs";
import { eq, sql } from "drizzle-orm";
import type { Db } from "./client";
import {
  auditEntries,
  engineSpecs,
  lappingSessions,
  seatChecks,
  specValues,
  strokes,
  customers,
  jobs,
  seats,
  shops,
  users,
  valves,
  type JobStatus,
  type SeatState,
  type UserRole,
} from "./schema";
import { decayingContrasts } from "@/lib/audio/synth";
import { createHeadWithSeats } from "@/lib/heads/create";
import { seatCode, type HeadLayout } from "@/lib/heads/layout";

export const DEMO_SHOP_NAME = "Millrace Head Works";

/** Development-only logins, printed in README. */
export const DEMO_USERS: ReadonlyArray<{
  email: string;
  name: string;
  role: UserRole;
  password: string;
}> = [
  { email: "ines@millrace.example", name: "Ines Marlow", role: "technician", password: "lap-it-in-1" },
  { email: "dov@millrace.example", name: "Dov Achterberg", role: "technician", password: "lap-it-in-2" },
  { email: "rhea@millrace.example", name: "Rhea Castellan", role: "supervisor", password: "sign-it-off" },
  { email: "admin@millrace.example", name: "Tobin Pell", role: "admin", password: "keys-to-the-shop" },
];

interface DemoJob {
  number: string;
  spec?: string;
  customer: string;
  engine: string;
  status: JobStatus;
  technician: string | null;
  promisedInDays: number;
  notes: string | null;
  head: { label: string } & HeadLayout;
  seatStates?: (code: string) => SeatState;
}

/**
 * Invented figures for the invented engines, in the range such engines commonly have; they are
 * demo data, not any maker's specification.
 */
const DEMO_SPECS: Array<{
  name: string;
  values: Array<{ key: string; min?: number; max?: number; limit?: number; nominal?: number; unit: "mm" | "N·m" | "N" }>;
}> = [
  {
    name: "Varda VX18 1.8 16V",
    values: [
      { key: "journal_clearance", min: 0.035, max: 0.072, limit: 0.1, unit: "mm" },
      { key: "cap_bolt_torque", nominal: 10, unit: "N·m" },
      { key: "seat_contact_width_intake", min: 1.0, max: 1.4, unit: "mm" },
      { key: "seat_contact_width_exhaust", min: 1.2, max: 1.6, unit: "mm" },
      { key: "valve_stem_diameter_intake", min: 5.465, max: 5.48, unit: "mm" },
      { key: "valve_stem_diameter_exhaust", min: 5.45, max: 5.465, unit: "mm" },
      { key: "stem_guide_clearance_intake", min: 0.02, max: 0.05, limit: 0.08, unit: "mm" },
      { key: "stem_guide_clearance_exhaust", min: 0.035, max: 0.065, limit: 0.1, unit: "mm" },
      { key: "installed_spring_height", min: 34.5, max: 35.5, unit: "mm" },
      { key: "spring_load", min: 180, max: 210, unit: "N" },
      { key: "deck_flatness", max: 0.05, limit: 0.1, unit: "mm" },
    ],
  },
  {
    name: "Halden HV30 3.0 V6 24V",
    values: [
      { key: "journal_clearance", min: 0.04, max: 0.08, limit: 0.12, unit: "mm" },
      { key: "cap_bolt_torque", nominal: 11, unit: "N·m" },
      { key: "seat_contact_width_intake", min: 1.1, max: 1.5, unit: "mm" },
      { key: "seat_contact_width_exhaust", min: 1.4, max: 1.9, unit: "mm" },
      { key: "deck_flatness", max: 0.05, limit: 0.1, unit: "mm" },
    ],
  },
];

const DEMO_CUSTOMERS = [
  {
    name: "Corrin Vale Fleet Services",
    contactName: "Tamsin Oduya",
    email: "workshop@corrinvale.example",
    phone: "0161 555 0142",
    address: "Depot 2, Corrin Vale Road, Lockbridge",
  },
  { name: "Juniper Oyelaran", contactName: null, email: "juniper.o@mail.example", phone: "07700 900 318", address: null },
  {
    name: "Saltmarsh Vintage Motor Club",
    contactName: "Ebbe Marrow",
    email: "secretary@saltmarsh-vmc.example",
    phone: null,
    address: null,
  },
  // Booked in at the counter: no way to reach them yet.
  { name: "Perrin Ashdown", contactName: null, email: null, phone: null, address: null },
];

const DEMO_JOBS: DemoJob[] = [
  {
    number: "MHW-0141",
    spec: "Varda VX18 1.8 16V",
    customer: "Corrin Vale Fleet Services",
    engine: "Varda VX18 1.8 inline-4, twin cam, 16 valves (van, 212,000 km)",
    status: "at_bench",
    technician: "ines@millrace.example",
    promisedInDays: 3,
    notes: "New valves and guides fitted. Customer wants the report by e-mail.",
    head: {
      label: "Cylinder head",
      arrangement: "inline",
      cylinderCount: 4,
      intakeValvesPerCylinder: 2,
      exhaustValvesPerCylinder: 2,
      camshaftCount: 2,
      journalsPerCamshaft: 5,
    },
    seatStates: (code) =>
      code.startsWith("1") ? "settled" : code === "2I1" || code === "2I2" ? "lapping" : "waiting",
  },
  {
    number: "MHW-0142",
    spec: "Halden HV30 3.0 V6 24V",
    customer: "Juniper Oyelaran",
    engine: "Halden HV30 3.0 V6, four cams, 24 valves (saloon, overheated once)",
    status: "queued",
    technician: "dov@millrace.example",
    promisedInDays: 9,
    notes: "Check both heads for flatness before any seat work.",
    head: {
      label: "Head pair",
      arrangement: "v",
      cylinderCount: 6,
      intakeValvesPerCylinder: 2,
      exhaustValvesPerCylinder: 2,
      camshaftCount: 4,
      journalsPerCamshaft: 4,
    },
  },
  {
    number: "MHW-0143",
    customer: "Saltmarsh Vintage Motor Club",
    engine: "Tor T14 1.4 inline-4, single cam, 8 valves (club rally car)",
    status: "awaiting_audit",
    technician: "ines@millrace.example",
    promisedInDays: 1,
    notes: null,
    head: {
      label: "Cylinder head",
      arrangement: "inline",
      cylinderCount: 4,
      intakeValvesPerCylinder: 1,
      exhaustValvesPerCylinder: 1,
      camshaftCount: 1,
      journalsPerCamshaft: 5,
    },
    seatStates: () => "settled",
  },
  {
    number: "MHW-0144",
    customer: "Corrin Vale Fleet Services",
    engine: "Tor T14 1.4 inline-4, single cam, 8 valves (delivery van)",
    status: "awaiting_audit",
    technician: "ines@millrace.example",
    promisedInDays: 2,
    notes: "Every seat settled; waiting for the supervisor's walk-through.",
    head: {
      label: "Cylinder head",
      arrangement: "inline",
      cylinderCount: 4,
      intakeValvesPerCylinder: 1,
      exhaustValvesPerCylinder: 1,
      camshaftCount: 1,
      journalsPerCamshaft: 5,
    },
    seatStates: () => "settled",
  },
  {
    number: "MHW-0145",
    customer: "Perrin Ashdown",
    engine: "Tor T14 1.4 inline-4, single cam, 8 valves (hatchback)",
    status: "awaiting_audit",
    technician: "ines@millrace.example",
    promisedInDays: 4,
    notes: "Walk-in customer; no e-mail on file yet.",
    head: {
      label: "Cylinder head",
      arrangement: "inline",
      cylinderCount: 4,
      intakeValvesPerCylinder: 1,
      exhaustValvesPerCylinder: 1,
      camshaftCount: 1,
      journalsPerCamshaft: 5,
    },
    seatStates: () => "settled",
  },
];

/** A decaying curve with a little stroke-to-stroke scatter, reproducible per seat. */
function demoContrasts(count: number, startDb: number, floorDb: number, decay: number, seed: number): number[] {
  return decayingContrasts(count, startDb, floorDb, decay).map((c, i) => {
    const wobble = Math.sin(seed * 12.9898 + i * 78.233) * 0.15;
    return Math.round((c + wobble) * 100) / 100;
  });
}

function isoDateInDays(days: number): string {
  const d = new Date();
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** Seeds the demo shop if, and only if, the database has no shop yet. Returns whether it did. */
export async function seedDemoShop(db: Db): Promise<boolean> {
  const existing = await db.select({ n: sql<number>`count(*)::int` }).from(shops);
  if ((existing[0]?.n ?? 0) > 0) return false;

  const hashes = await Promise.all(DEMO_USERS.map((u) => bcrypt.hash(u.password, 10)));

  await db.transaction(async (tx) => {
    // A second process racing us would fail on the unique shop name and roll back cleanly.
    const [shop] = await tx
      .insert(shops)
      .values({ name: DEMO_SHOP_NAME, address: "Unit 4, Weir Yard, Lockbridge", phone: "01632 960 414" })
      .returning();
    if (!shop) throw new Error("demo shop insert returned nothing");

    const insertedUsers = await tx
      .insert(users)
      .values(
        DEMO_USERS.map((u, i) => ({
          shopId: shop.id,
          email: u.email,
          name: u.name,
          role: u.role,
          passwordHash: hashes[i]!,
        })),
      )
      .returning();
    const userByEmail = new Map(insertedUsers.map((u) => [u.email, u]));

    const insertedCustomers = await tx
      .insert(customers)
      .values(DEMO_CUSTOMERS.map((c) => ({ ...c, shopId: shop.id })))
      .returning();
    const customerByName = new Map(insertedCustomers.map((c) => [c.name, c]));

    const specByName = new Map<string, string>();
    for (const spec of DEMO_SPECS) {
      const [row] = await tx
        .insert(engineSpecs)
        .values({ shopId: shop.id, name: spec.name, source: "Demo figures (invented)" })
        .returning();
      specByName.set(spec.name, row!.id);
      await tx.insert(specValues).values(
        spec.values.map((v) => ({
          engineSpecId: row!.id,
          key: v.key,
          minValue: v.min ?? null,
          maxValue: v.max ?? null,
          limitValue: v.limit ?? null,
          nominalValue: v.nominal ?? null,
          unit: v.unit,
        })),
      );
    }

    for (const j of DEMO_JOBS) {
      const [job] = await tx
        .insert(jobs)
        .values({
          shopId: shop.id,
          number: j.number,
          customerId: customerByName.get(j.customer)!.id,
          engineDescription: j.engine,
          status: j.status,
          assignedTechnicianId: j.technician ? userByEmail.get(j.technician)!.id : null,
          promisedOn: isoDateInDays(j.promisedInDays),
          notes: j.notes,
          engineSpecId: j.spec ? specByName.get(j.spec)! : null,
        })
        .returning();
      const { label, ...layout } = j.head;
      const created = await createHeadWithSeats(tx, job!.id, label, layout);
      // The scenario's seat states, and part numbers and serials on the valves.
      const insertedSeats = [];
      for (const [k, seat] of created.seats.entries()) {
        const state = j.seatStates?.(seatCode(seat)) ?? "waiting";
        if (state !== "waiting") await tx.update(seats).set({ state }).where(eq(seats.id, seat.id));
        await tx
          .update(valves)
          .set({
            lappedInSeatId: j.technician && (state === "settled" || state === "lapping") ? seat.id : null,
            partNumber: seat.kind === "intake" ? "VI-3301" : "VE-3302",
            serial: `${j.number.slice(-4)}-${String(k + 1).padStart(2, "0")}`,
          })
          .where(eq(valves.seatId, seat.id));
        insertedSeats.push({ ...seat, state });
      }

      // Seats the scenario calls settled or lapping get the strokes that put them there, so the
      // server's verdict agrees with the state shown.
      const techId = j.technician ? userByEmail.get(j.technician)!.id : null;
      if (techId) {
        let k = 0;
        for (const seat of insertedSeats) {
          if (seat.state !== "settled" && seat.state !== "lapping") continue;
          k++;
          const stages: Array<["coarse" | "fine", number[]]> =
            seat.state === "settled"
              ? [
                  ["coarse", demoContrasts(14, 11 + (k % 3), 0.6, 2.6, k)],
                  ["fine", demoContrasts(10, 4.5, 0.3, 1.8, k + 7)],
                ]
              : [["coarse", demoContrasts(5, 10 + (k % 2), 0.8, 2.4, k)]];
          for (const [stage, contrasts] of stages) {
            const [session] = await tx
              .insert(lappingSessions)
              .values({
                seatId: seat.id,
                stage,
                technicianId: techId,
                sampleRateHz: 48000,
                noiseFloorDb: -68,
                deviceId: "demo-seed",
                endedAt: seat.state === "settled" ? new Date() : null,
                lastSeenAt: new Date(Date.now() - 3600_000),
              })
              .returning();
            let t = 2.1;
            await tx.insert(strokes).values(
              contrasts.map((c, n) => {
                const startS = t;
                t += 1.3;
                return {
                  sessionId: session!.id,
                  clientId: crypto.randomUUID(),
                  index: n + 1,
                  startS,
                  endS: startS + 0.8,
                  onsetDb: -33 + c,
                  bodyDb: -33,
                  contrastDb: c,
                };
              }),
            );
          }
          // A settled seat of the scenario has its done-checks recorded at the bench, all passed.
          if (seat.state === "settled") {
            await tx.insert(seatChecks).values([
              { seatId: seat.id, kind: "contact_ring", result: "pass", recordedById: techId },
              { seatId: seat.id, kind: "marking_compound", result: "pass", recordedById: techId },
              { seatId: seat.id, kind: "leak_test", result: "pass", port: seat.kind, recordedById: techId },
            ]);
          }
        }
      }

      await tx.insert(auditEntries).values({
        actorId: userByEmail.get("admin@millrace.example")!.id,
        action: "job.created",
        entityType: "job",
        entityId: job!.id,
        jobId: job!.id,
        after: { number: j.number, status: j.status, source: "demo seed" },
      });
    }
  });
  return true;
}
