// Customers: records of their own, with how to reach them. Supervisors and admins add and edit
// them (technicians cannot), every change is audited with before and after, bad input is refused
// field by field with nothing saved, and booking in a job for a new customer keeps its details.
import { and, desc, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, customers, jobs, users } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { createCustomer, updateCustomer } = await import("@/lib/actions/customers");
const { createJob } = await import("@/lib/actions/jobs");
const { initialActionState } = await import("@/lib/actions/state");
const { customerSchema } = await import("@/lib/validations/customers");
const { listCustomers } = await import("@/db/queries/customers");
const { jobForm } = await import("../sheets/helpers");

let ids: Map<string, string>;
let shopId: string;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const rows = await state.t.db.select().from(users);
  ids = new Map(rows.map((r) => [r.email, r.id]));
  shopId = rows[0]!.shopId;
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};
const form = (o: Record<string, string>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(o)) f.set(k, v);
  return f;
};
const auditCount = async () => (await db().select({ n: sql<number>`count(*)::int` }).from(auditEntries))[0]!.n;
const customerCount = async () => (await db().select({ n: sql<number>`count(*)::int` }).from(customers))[0]!.n;
const lastEntry = async (action: string) =>
  (await db().select().from(auditEntries).where(eq(auditEntries.action, action)).orderBy(desc(auditEntries.id)).limit(1))[0];
const byName = async (name: string) => (await db().select().from(customers).where(eq(customers.name, name)))[0];

describe("the customer's fields", () => {
  it("take blanks as not given and trim what is typed", () => {
    const v = customerSchema.parse({ name: "  Hollin Brook Motors ", contactName: "", email: " Desk@HollinBrook.example ", phone: "+44 (0)1632 960-101", address: "" });
    expect(v).toEqual({ name: "Hollin Brook Motors", contactName: null, email: "desk@hollinbrook.example", phone: "+44 (0)1632 960-101", address: null });
  });

  it("refuse a bad e-mail, a phone with letters or too few digits, and over-long text, each on its own field", () => {
    const cases: Array<[Record<string, string>, string, RegExp]> = [
      [{ email: "desk@" }, "email", /e-mail address/],
      [{ email: "two@@signs.example" }, "email", /e-mail address/],
      [{ phone: "01632 ABC" }, "phone", /digits, spaces/],
      [{ phone: "12 34" }, "phone", /at least 6 digits/],
      [{ phone: "0".repeat(31) }, "phone", /under 30/],
      [{ name: "X" }, "name", /at least 2/],
      [{ contactName: "n".repeat(121) }, "contactName", /under 120/],
      [{ address: "a".repeat(301) }, "address", /under 300/],
    ];
    for (const [o, field, message] of cases) {
      const r = customerSchema.safeParse({ name: "Hollin Brook Motors", ...o });
      expect(r.success, JSON.stringify(o)).toBe(false);
      const issue = r.error!.issues.find((i) => i.path[0] === field);
      expect(issue?.message, JSON.stringify(o)).toMatch(message);
    }
    // A phone number as people write it, with an extension.
    expect(customerSchema.safeParse({ name: "Hollin Brook Motors", phone: "01632 960 101 ext 12" }).success).toBe(true);
  });
});

describe("customer actions", () => {
  beforeEach(() => signInAs(null));

  it("refuse anonymous callers and technicians, changing nothing", async () => {
    const [before, entries] = [await customerCount(), await auditCount()];
    const fields = { name: "Sneaky Garage", email: "s@sneaky.example" };
    expect(await createCustomer(initialActionState, form(fields))).toMatchObject({ ok: false, message: "Sign in to continue." });
    signInAs("ines@millrace.example");
    const res = await createCustomer(initialActionState, form(fields));
    expect(res.ok).toBe(false);
    expect(res.message).toMatch(/supervisor or an admin/);
    const corrin = await byName("Corrin Vale Fleet Services");
    const edit = await updateCustomer(initialActionState, form({ id: corrin!.id, name: corrin!.name, email: "stolen@x.example" }));
    expect(edit.ok).toBe(false);
    expect((await byName("Corrin Vale Fleet Services"))!.email).toBe(corrin!.email);
    expect([await customerCount(), await auditCount()]).toEqual([before, entries]);
  });

  it("a supervisor adds a customer with contact details, audited with what was typed", async () => {
    signInAs("rhea@millrace.example");
    const res = await createCustomer(
      initialActionState,
      form({ name: "Hollin Brook Motors", contactName: "Ada Penhale", email: "Desk@HollinBrook.example", phone: "01632 960 101", address: "9 Quarry Row\nLockbridge" }),
    );
    expect(res).toMatchObject({ ok: true, message: "Hollin Brook Motors added." });
    const row = await byName("Hollin Brook Motors");
    expect(row).toMatchObject({ shopId, contactName: "Ada Penhale", email: "desk@hollinbrook.example", phone: "01632 960 101", address: "9 Quarry Row\nLockbridge" });
    const entry = await lastEntry("customer.created");
    expect(entry).toMatchObject({
      actorId: ids.get("rhea@millrace.example"),
      entityType: "customer",
      entityId: row!.id,
      before: null,
      after: { name: "Hollin Brook Motors", contactName: "Ada Penhale", email: "desk@hollinbrook.example", phone: "01632 960 101", address: "9 Quarry Row\nLockbridge" },
    });
    // The list shows it with its details and no jobs yet.
    const listed = (await listCustomers(db(), shopId)).find((c) => c.name === "Hollin Brook Motors");
    expect(listed).toMatchObject({ email: "desk@hollinbrook.example", jobCount: 0 });
  });

  it("bad input is refused with a message on each field and nothing saved", async () => {
    signInAs("rhea@millrace.example");
    const [before, entries] = [await customerCount(), await auditCount()];
    const res = await createCustomer(initialActionState, form({ name: "Bad Input Ltd", email: "bad-input.example", phone: "phone me" }));
    expect(res.ok).toBe(false);
    expect(res.message).toBe("Check the highlighted fields.");
    expect(res.fieldErrors.email?.[0]).toMatch(/does not look like an e-mail address/);
    expect(res.fieldErrors.phone?.[0]).toMatch(/digits, spaces/);
    const dup = await createCustomer(initialActionState, form({ name: "Juniper Oyelaran" }));
    expect(dup.ok).toBe(false);
    expect(dup.fieldErrors.name?.[0]).toMatch(/Already used/);
    expect([await customerCount(), await auditCount()]).toEqual([before, entries]);
  });

  it("an admin edits a customer: only what changed is audited, before and after", async () => {
    signInAs("admin@millrace.example");
    const perrin = await byName("Perrin Ashdown");
    expect(perrin).toMatchObject({ email: null, phone: null });
    const res = await updateCustomer(
      initialActionState,
      form({ id: perrin!.id, name: "Perrin Ashdown", contactName: perrin!.contactName ?? "", email: "perrin@ashdown.example", phone: "07700 900 123", address: perrin!.address ?? "" }),
    );
    expect(res).toMatchObject({ ok: true, message: "Perrin Ashdown saved." });
    expect(await byName("Perrin Ashdown")).toMatchObject({ email: "perrin@ashdown.example", phone: "07700 900 123" });
    const entry = await lastEntry("customer.updated");
    expect(entry).toMatchObject({
      actorId: ids.get("admin@millrace.example"),
      entityId: perrin!.id,
      before: { email: null, phone: null },
      after: { email: "perrin@ashdown.example", phone: "07700 900 123" },
    });
    // Saving the same again writes nothing and records nothing.
    const entries = await auditCount();
    const again = await updateCustomer(
      initialActionState,
      form({ id: perrin!.id, name: "Perrin Ashdown", contactName: perrin!.contactName ?? "", email: "perrin@ashdown.example", phone: "07700 900 123", address: perrin!.address ?? "" }),
    );
    expect(again).toMatchObject({ ok: true, message: "Nothing changed." });
    expect(await auditCount()).toBe(entries);
    // A bad e-mail on edit is refused and the saved one stays.
    const bad = await updateCustomer(initialActionState, form({ id: perrin!.id, name: "Perrin Ashdown", email: "perrin@" }));
    expect(bad.fieldErrors.email?.[0]).toMatch(/e-mail address/);
    expect((await byName("Perrin Ashdown"))!.email).toBe("perrin@ashdown.example");
    // Renaming onto another customer's name is refused on the name field.
    const clash = await updateCustomer(initialActionState, form({ id: perrin!.id, name: "Juniper Oyelaran" }));
    expect(clash.fieldErrors.name?.[0]).toMatch(/Already used/);
  });

  it("booking in a job for a new customer keeps its contact details, audited as customer.created", async () => {
    signInAs("rhea@millrace.example");
    const res = await createJob(
      jobForm({
        newCustomerName: "Tidewell Cab Co",
        newCustomerContactName: "Sol Amberley",
        newCustomerEmail: "dispatch@tidewell.example",
        newCustomerPhone: "01632 960 555",
        newCustomerAddress: "Depot 2, Tidewell Road",
      }),
    );
    expect(res.ok, res.message ?? "").toBe(true);
    const tidewell = await byName("Tidewell Cab Co");
    expect(tidewell).toMatchObject({ contactName: "Sol Amberley", email: "dispatch@tidewell.example", phone: "01632 960 555", address: "Depot 2, Tidewell Road" });
    const [job] = await db().select().from(jobs).where(eq(jobs.id, res.jobId!));
    expect(job!.customerId).toBe(tidewell!.id);
    expect(await lastEntry("customer.created")).toMatchObject({ entityId: tidewell!.id, after: { email: "dispatch@tidewell.example" } });
    expect((await listCustomers(db(), shopId)).find((c) => c.id === tidewell!.id)!.jobCount).toBe(1);
  });

  it("booking in for a customer already known by that name fills in only its blank details", async () => {
    signInAs("rhea@millrace.example");
    const juniper = await byName("Juniper Oyelaran");
    const res = await createJob(jobForm({ newCustomerName: "Juniper Oyelaran", newCustomerEmail: "other@juniper.example", newCustomerPhone: "01632 960 556" }));
    expect(res.ok, res.message ?? "").toBe(true);
    const after = await byName("Juniper Oyelaran");
    expect(after!.email).toBe(juniper!.email);
    expect(after!.phone).toBe(juniper!.phone ?? "01632 960 556");
    expect(await db().select().from(customers).where(and(eq(customers.shopId, shopId), eq(customers.name, "Juniper Oyelaran")))).toHaveLength(1);
  });

  it("a bad e-mail for a new customer refuses the booking on that field, and nothing is saved", async () => {
    signInAs("rhea@millrace.example");
    const [before, jobsBefore] = [await customerCount(), (await db().select({ n: sql<number>`count(*)::int` }).from(jobs))[0]!.n];
    const res = await createJob(jobForm({ newCustomerName: "Wrexby Hauliers", newCustomerEmail: "wrexby at example" }));
    expect(res.ok).toBe(false);
    expect(res.fieldErrors.newCustomerEmail?.[0]).toMatch(/e-mail address/);
    expect(await customerCount()).toBe(before);
    expect((await db().select({ n: sql<number>`count(*)::int` }).from(jobs))[0]!.n).toBe(jobsBefore);
  });
});
