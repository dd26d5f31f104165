// Who is signed in is checked against the users table on every request, not taken from the token:
// a password reset, a deactivation or "sign out everywhere" ends the person's sessions at their
// next request on every path (a page's guard, a route, the stroke save); a changed role applies
// at once, and a technician made supervisor goes on saving their strokes.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { users } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { currentActor } = await import("@/lib/auth/guard");
const { authOptions } = await import("@/lib/auth/options");
const people = await import("@/lib/actions/users");
const { initialActionState } = await import("@/lib/actions/state");
const { startSession } = await import("@/lib/bench/service");
const jobsRoute = await import("@/app/api/jobs/route");
const strokesRoute = await import("@/app/api/sessions/[sessionId]/strokes/route");
const h = await import("../sheets/helpers");
const { seatId, strokeInputs } = await import("../bench/helpers");

let t: TestDatabase;
let ines: Awaited<ReturnType<typeof h.actorOf>>;
let admin: Awaited<ReturnType<typeof h.actorOf>>;
let sessionId: string;

const as = (id: string, sv = 0) => {
  state.session = { user: { id, sv } } as typeof state.session;
};
const form = (o: Record<string, string>) => h.form(o);
const version = async (id: string) => (await t.db.select({ v: users.sessionVersion }).from(users).where(eq(users.id, id)))[0]!.v;
const jobsStatus = async () => (await jobsRoute.GET(new NextRequest("http://grindfade.test/api/jobs"), { params: Promise.resolve({}) })).status;
let index = 1;
const saveStatus = async () => {
  const req = new NextRequest(`http://grindfade.test/api/sessions/${sessionId}/strokes`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ strokes: strokeInputs([6], (index += 1)) }),
  });
  return (await strokesRoute.POST(req, { params: Promise.resolve({ sessionId }) })).status;
};

beforeAll(async () => {
  t = await freshPglite();
  state.t = t;
  await seedDemoShop(t.db);
  ines = await h.actorOf(t.db, "ines@millrace.example");
  admin = await h.actorOf(t.db, "admin@millrace.example");
  sessionId = randomUUID();
  await startSession(t.db, ines, await seatId(t.db, "MHW-0141", "1I1"), { sessionId, stage: "coarse", deviceId: "version-phone" });
});
afterAll(async () => {
  await t?.cleanup();
});

describe("session versions", () => {
  it("puts the account's session version in the token at sign-in", async () => {
    const jwt = authOptions.callbacks!.jwt!;
    const token = await jwt({ token: {}, user: { id: ines.id, role: "technician", sessionVersion: 3 } } as Parameters<typeof jwt>[0]);
    expect(token).toMatchObject({ uid: ines.id, role: "technician", sv: 3 });
  });

  it("a password reset signs the person out on every path at their next request", async () => {
    as(ines.id);
    expect(await currentActor()).toMatchObject({ id: ines.id });
    expect(await jobsStatus()).toBe(200);
    expect(await saveStatus()).toBe(201);
    as(admin.id);
    expect((await people.resetPassword(initialActionState, form({ id: ines.id, password: "Fresh-Lapping-Phrase-5521!" }))).ok).toBe(true);
    expect(await version(ines.id)).toBe(1);
    as(ines.id, 0);
    expect(await currentActor()).toBeNull();
    expect(await jobsStatus()).toBe(401);
    expect(await saveStatus()).toBe(401);
    // Signed in again, with the new version.
    as(ines.id, 1);
    expect(await saveStatus()).toBe(201);
  });

  it("an admin can sign a person out everywhere, and deactivate them", async () => {
    as(admin.id);
    expect((await people.endSessions(initialActionState, form({ id: ines.id }))).ok).toBe(true);
    as(ines.id, 1);
    expect(await saveStatus()).toBe(401);
    as(ines.id, 2);
    expect(await saveStatus()).toBe(201);

    as(admin.id);
    expect((await people.setActive(initialActionState, form({ id: ines.id, active: "false" }))).ok).toBe(true);
    for (const sv of [2, 3]) {
      as(ines.id, sv);
      expect(await currentActor()).toBeNull();
      expect(await jobsStatus()).toBe(401);
      expect(await saveStatus()).toBe(401);
    }
    as(admin.id);
    expect((await people.setActive(initialActionState, form({ id: ines.id, active: "true" }))).ok).toBe(true);
    as(ines.id, 4);
    expect(await saveStatus()).toBe(201);
  });

  it("refuses an admin deactivating themselves or the last active admin", async () => {
    as(admin.id);
    const self = await people.setActive(initialActionState, form({ id: admin.id, active: "false" }));
    expect(self).toMatchObject({ ok: false, message: expect.stringMatching(/yourself/) });
    expect((await people.setActive(initialActionState, form({ id: "not-an-id", active: "false" }))).fieldErrors.id).toBeTruthy();
  });

  it("holds a person to their current role without ending their session", async () => {
    as(admin.id);
    // Made supervisor: still saves strokes with the same token.
    expect((await people.changeRole(initialActionState, form({ id: ines.id, role: "supervisor" }))).ok).toBe(true);
    as(ines.id, 4);
    expect(await saveStatus()).toBe(201);
    // Made admin: the same token may no longer save strokes.
    as(admin.id);
    expect((await people.changeRole(initialActionState, form({ id: ines.id, role: "admin" }))).ok).toBe(true);
    as(ines.id, 4);
    expect(await saveStatus()).toBe(403);
    expect(await jobsStatus()).toBe(200);
  });
});
