// The audit page: readable by supervisors and admins, refused to technicians, filtered through
// its search parameters, with an empty state. Rendered to HTML on the server as Next would.
import { eq } from "drizzle-orm";
import { renderToStaticMarkup } from "react-dom/server";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { jobs } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const { getUnapprovedSeatCodes } = await import("@/db/queries/reviews");
const { default: AuditPage } = await import("@/app/(shop)/audit/page");
const h = await import("../sheets/helpers");

const db = () => state.t!.db;
type Actor = Awaited<ReturnType<typeof h.actorOf>>;
let rhea: Actor, ines: Actor, admin: Actor;
let job143: string;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  rhea = await h.actorOf(db(), "rhea@millrace.example");
  ines = await h.actorOf(db(), "ines@millrace.example");
  admin = await h.actorOf(db(), "admin@millrace.example");
  job143 = (await db().select().from(jobs).where(eq(jobs.number, "MHW-0143")))[0]!.id;
  await review.reviewHead(db(), rhea, { jobId: job143, decision: "sent_back", comment: "Deck flatness missing" });
});
afterAll(async () => {
  await state.t?.cleanup();
});

function signInAs(a: Actor) {
  state.session = { user: { id: a.id } };
}
async function render(params: Record<string, string>) {
  const el = await AuditPage({ params: Promise.resolve({}), searchParams: Promise.resolve(params) } as Parameters<typeof AuditPage>[0]);
  return renderToStaticMarkup(el);
}

describe("audit page", () => {
  beforeEach(() => signInAs(rhea));

  it("is refused to a technician: forbidden(), which the framework answers with 403 and app/forbidden.tsx", async () => {
    signInAs(ines);
    await expect(render({})).rejects.toMatchObject({ digest: "NEXT_HTTP_ERROR_FALLBACK;403" });
  });

  it("lists the supervisor's send-back for supervisors and admins, filtered by person", async () => {
    const html = await render({ person: rhea.id, job: job143 });
    expect(html).toContain("job.sent_back");
    expect(html).toContain("Rhea Castellan");
    expect(html).toContain("&quot;status&quot;:&quot;at_bench&quot;");
    signInAs(admin);
    expect(await render({})).toContain('data-testid="audit-list"');
  });

  it("shows the empty state when nothing matches, and a message for a bad filter", async () => {
    expect(await render({ person: ines.id, from: "2001-01-01", to: "2001-01-02" })).toContain('data-testid="audit-empty"');
    const bad = await render({ from: "yesterday" });
    expect(bad).toContain("Use a date like 2026-03-14.");
    expect(bad).toContain('data-testid="audit-list"');
  });

  it("the head panel's list of seats still to approve names them in head order", async () => {
    expect(await getUnapprovedSeatCodes(db(), rhea.shopId, job143)).toEqual(["1I1", "1E1", "2I1", "2E1", "3I1", "3E1", "4I1", "4E1"]);
  });
});
