// The audit page: readable by supervisors and admins, refused to technicians, filtered through
// its search parameters, with an empty state. Rendered to HTML on the server as Next would.
import { eq } from "drizzle-orm";
import { renderToStaticMarkup } from "react-dom/server";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { auditEntries, jobs } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const review = await import("@/lib/review/service");
const { getUnapprovedSeatCodes } = await import("@/db/queries/reviews");
const { default: AuditPage } = await import("@/app/(shop)/audit/page");
const h = await import("../sheets/helpers");
const b = await import("../bench/helpers");

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
/** The page's text as a reader sees it: tags dropped, entities decoded. */
function textOf(html: string): string {
  return html
    .replace(/<style[\s\S]*?<\/style>/g, "")
    .replace(/<[^>]+>/g, "")
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, "&")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">");
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

  it("lists the supervisor's send-back in words for supervisors and admins, filtered by person", async () => {
    const html = await render({ person: rhea.id, job: job143 });
    const text = textOf(html);
    expect(text).toContain("Rhea Castellan sent MHW-0143 back to the bench");
    expect(text).toContain("status: Awaiting audit → At the bench");
    expect(text).toContain("comment: — → 'Deck flatness missing'");
    // The job is a link to its page; nothing of the record shows as code or JSON.
    expect(html).toContain(`href="/jobs/${job143}"`);
    expect(text).not.toContain("job.sent_back");
    expect(text).not.toMatch(/[{}]|&quot;/);
    // The filters read as a heading (printed too), and the export takes the same filters.
    expect(text).toContain("Showing job MHW-0143, by Rhea Castellan, all dates");
    expect(html).toContain(`href="/api/audit/csv?job=${job143}&amp;person=${rhea.id}"`);
    signInAs(admin);
    expect(await render({})).toContain('data-testid="audit-list"');
  });

  it("a burst reads as one line that opens to its entries, each seat a link to its listen-back", async () => {
    const job141 = (await db().select().from(jobs).where(eq(jobs.number, "MHW-0141")))[0]!.id;
    const codes = ["1E1", "2I1", "2I2"];
    const ids = await Promise.all(codes.map((c) => b.seatId(db(), "MHW-0141", c)));
    const t0 = Date.parse("2026-11-02T09:00:00.000Z");
    await db()
      .insert(auditEntries)
      .values(
        ids.map((id, i) => ({
          at: new Date(t0 + i * 10_000),
          actorId: rhea.id,
          action: "seat.approved",
          entityType: "seat",
          entityId: id,
          jobId: job141,
          before: { seat: codes[i], state: "settled" },
          after: { seat: codes[i], state: "approved", comment: "Even grey ring" },
        })),
      );
    const html = await render({ job: job141, from: "2026-11-02", to: "2026-11-02" });
    const bursts = html.match(/<li[^>]*data-testid="audit-burst"[\s\S]*?<\/details><\/li>/g) ?? [];
    expect(bursts).toHaveLength(1);
    const burst = bursts[0]!;
    expect(textOf(burst.match(/<summary[\s\S]*?<\/summary>/)![0])).toMatch(/^Rhea Castellan approved 3 seats on MHW-0141 \(3 entries — open to see each\)/);
    expect(burst).not.toContain("<details open");
    for (const [i, id] of ids.entries()) {
      expect(burst).toContain(`href="/review/${id}"`);
      expect(textOf(burst)).toContain(`Rhea Castellan approved seat ${codes[i]} on MHW-0141`);
    }
    expect(textOf(html)).toContain("Showing job MHW-0141, by everyone, from 2 Nov 2026 to 2 Nov 2026");
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
