// The shop's details (printed at the head of every report): the admin's alone to change, time
// zones checked against the runtime's IANA list (Intl), every change audited as shop.updated.
import { desc, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { auditEntries, shops, users } from "@/db/schema";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { updateShopSettings } = await import("@/lib/actions/shop");
const { initialActionState } = await import("@/lib/actions/state");
const { isIanaTimeZone, shopSettingsSchema } = await import("@/lib/validations/shop");

let ids: Map<string, string>;
beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ids = new Map((await state.t.db.select().from(users)).map((r) => [r.email, r.id]));
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};
const DEMO = { name: "Millrace Head Works", address: "Unit 4, Weir Yard, Lockbridge", phone: "01632 960 414", timeZone: "Europe/London" };
const form = (o: Record<string, string> = {}) => {
  const f = new FormData();
  for (const [k, v] of Object.entries({ ...DEMO, ...o })) f.set(k, v);
  return f;
};
const shop = async () => (await db().select().from(shops).where(eq(shops.name, "Millrace Head Works")))[0]!;
const auditCount = async () => (await db().select({ n: sql<number>`count(*)::int` }).from(auditEntries))[0]!.n;

describe("time zones", () => {
  it("are IANA names the runtime knows (Intl.DateTimeFormat), stored as the runtime spells them", () => {
    for (const ok of ["Europe/London", "America/Chicago", "Australia/Lord_Howe", "UTC", "Etc/GMT+5"]) expect(isIanaTimeZone(ok), ok).toBe(true);
    for (const bad of ["Europe/Lockbridge", "+01:00", "GMT+1 ", "London", "", "../etc/passwd"]) expect(isIanaTimeZone(bad), bad).toBe(false);
    expect(shopSettingsSchema.parse({ ...DEMO, timeZone: "america/new_york" }).timeZone).toBe("America/New_York");
  });
});

describe("shop details action", () => {
  beforeEach(() => signInAs(null));

  it("refuses everyone but an admin, changing nothing", async () => {
    const [before, entries] = [await shop(), await auditCount()];
    expect(await updateShopSettings(initialActionState, form({ phone: "01632 960 000" }))).toMatchObject({ ok: false, message: "Sign in to continue." });
    for (const who of ["ines@millrace.example", "rhea@millrace.example"]) {
      signInAs(who);
      const res = await updateShopSettings(initialActionState, form({ phone: "01632 960 000" }));
      expect(res.ok).toBe(false);
      expect(res.message).toMatch(/admin/);
    }
    expect([await shop(), await auditCount()]).toEqual([before, entries]);
  });

  it("an admin changes the phone and time zone; the entry holds only what changed", async () => {
    signInAs("admin@millrace.example");
    const res = await updateShopSettings(initialActionState, form({ phone: "01632 960 999", timeZone: "Europe/Dublin" }));
    expect(res).toMatchObject({ ok: true, message: "Shop details saved." });
    expect(await shop()).toMatchObject({ ...DEMO, phone: "01632 960 999", timeZone: "Europe/Dublin" });
    const [entry] = await db().select().from(auditEntries).where(eq(auditEntries.action, "shop.updated")).orderBy(desc(auditEntries.id)).limit(1);
    expect(entry).toMatchObject({
      actorId: ids.get("admin@millrace.example"),
      entityType: "shop",
      before: { phone: "01632 960 414", timeZone: "Europe/London" },
      after: { phone: "01632 960 999", timeZone: "Europe/Dublin" },
    });
    const entries = await auditCount();
    expect(await updateShopSettings(initialActionState, form({ phone: "01632 960 999", timeZone: "Europe/Dublin" }))).toMatchObject({ ok: true, message: "Nothing changed." });
    expect(await auditCount()).toBe(entries);
    // Back as it was.
    expect((await updateShopSettings(initialActionState, form())).ok).toBe(true);
    expect(await shop()).toMatchObject(DEMO);
  });

  it("bad input is refused field by field, nothing saved", async () => {
    signInAs("admin@millrace.example");
    const [before, entries] = [await shop(), await auditCount()];
    const res = await updateShopSettings(initialActionState, form({ name: " ", phone: "gate 4", timeZone: "Mars/Olympus_Mons", address: "a".repeat(301) }));
    expect(res.ok).toBe(false);
    expect(res.fieldErrors.name?.[0]).toMatch(/shop's name/);
    expect(res.fieldErrors.phone?.[0]).toMatch(/digits, spaces/);
    expect(res.fieldErrors.timeZone?.[0]).toMatch(/Europe\/London/);
    expect(res.fieldErrors.address?.[0]).toMatch(/under 300/);
    expect([await shop(), await auditCount()]).toEqual([before, entries]);
  });
});
