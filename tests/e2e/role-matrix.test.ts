// The role matrix over real HTTP: every page and every route handler method of the production
// build, called by each persona of tests/security/role-matrix.ts, answers what the matrix says.
// Plain fetch with each persona's session cookie; no browser.
//
// The shared server's other test files use MHW-0141 seats 1*, 2I1, 2I2, 2E1, 3I1, 3E1, 4I1 and
// 4E2, and MHW-0143; this file works only on MHW-0141 seats 3I2 and 3E2 and MHW-0142 seats 1I1
// and 1E1, in sessions, strokes, recordings and photos it makes itself.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, inject, it } from "vitest";
import { DEMO_USERS } from "@/db/seed";
import { encodeWav } from "@/lib/audio";
import {
  PAGE_MATRIX,
  PERSONAS,
  ROUTE_MATRIX,
  TARGET_JOB,
  isAllowed,
  type PageOutcome,
  type Persona,
} from "../security/role-matrix";
import { listPages, listRouteHandlers, type HttpMethod } from "../security/route-tree";

const baseURL = inject("baseURL");

// ---------------------------------------------------------------- HTTP with a cookie jar

interface Req {
  method?: HttpMethod;
  path: string;
  headers?: Record<string, string>;
  body?: BodyInit;
}

class Caller {
  private readonly cookies = new Map<string, string>();
  email: string | null = null;

  async send({ method = "GET", path, headers = {}, body }: Req): Promise<Response> {
    const h = new Headers(headers);
    if (this.cookies.size)
      h.set("cookie", [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; "));
    // Mutating API requests must come from the app's own origin.
    if (method !== "GET" && method !== "HEAD") h.set("origin", baseURL);
    return fetch(`${baseURL}${path}`, { method, headers: h, body, redirect: "manual" });
  }

  private keep(res: Response): void {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const at = pair!.indexOf("=");
      this.cookies.set(pair!.slice(0, at), pair!.slice(at + 1));
    }
  }

  /** next-auth's credentials sign-in over HTTP: the CSRF token and cookie first, then the form. */
  async signIn(email: string): Promise<this> {
    const user = DEMO_USERS.find((u) => u.email === email)!;
    const csrf = await this.send({ path: "/api/auth/csrf" });
    this.keep(csrf);
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };
    const res = await this.send({
      method: "POST",
      path: "/api/auth/callback/credentials",
      headers: { "content-type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ csrfToken, email, password: user.password, json: "true" }),
    });
    expect(res.status, `sign-in of ${email}`).toBe(200);
    this.keep(res);
    const session = (await (await this.send({ path: "/api/auth/session" })).json()) as {
      user?: { email: string };
    };
    expect(session.user?.email).toBe(email);
    this.email = email;
    return this;
  }

  async json<T>(path: string): Promise<T> {
    const res = await this.send({ path });
    expect(res.status, path).toBe(200);
    return (await res.json()) as T;
  }
}

const anonymous = new Caller();
const ines = new Caller();
const rhea = new Caller();
const admin = new Caller();
const CALLERS: Record<Persona, Caller> = {
  anonymous,
  technicianOwnJob: ines,
  technicianOtherJob: ines,
  supervisor: rhea,
  admin,
};

// ---------------------------------------------------------------- the records each persona works on

interface JobRecords {
  number: string;
  jobId: string;
  headId: string;
  /** Seat for the pages, photos and the sessions below. */
  seatId: string;
  /** Seat on which the sessions route starts new sessions. */
  sessionSeatId: string;
  /** A session with a recording, for strokes, recordings and chunks. */
  sessionId: string;
  /** A session kept for ending. */
  endSessionId: string;
  photoId: string;
  /** A customer of the shop, for the customer's page. */
  customerId: string;
}

type JobNumber = (typeof TARGET_JOB)[Persona];
const records = {} as Record<JobNumber, JobRecords>;
const recordsOf = (p: Persona) => records[TARGET_JOB[p]];

/** The id of a seat on a job page's seat map, by its code ("3I2" = cylinder 3, intake 2). */
function seatOnMap(html: string, code: string): string {
  const [, cyl, kind, pos] = /^(\d+)([IE])(\d+)$/.exec(code)!;
  const label = `Cylinder ${cyl} ${kind === "I" ? "intake" : "exhaust"} ${pos},`;
  const m = new RegExp(`aria-label="${label}[^"]*"[^>]*data-seat-id="([0-9a-f-]{36})"`).exec(html);
  if (!m) throw new Error(`seat ${code} not on the map`);
  return m[1]!;
}

// A fifth of a second of a 440 Hz tone as 16-bit WAV; `extra` samples make each upload's length its own.
const wav = (extra = 0) =>
  encodeWav(
    [
      Float32Array.from(
        { length: 1600 + extra },
        (_, i) => 0.25 * Math.sin((2 * Math.PI * 440 * i) / 8000),
      ),
    ],
    8000,
  );
// The smallest PNG: one transparent pixel (PNG signature, IHDR, IDAT, IEND).
const PNG = Buffer.from(
  "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==",
  "base64",
);

const json = (body: unknown): Pick<Req, "headers" | "body"> => ({
  headers: { "content-type": "application/json" },
  body: JSON.stringify(body),
});

async function startSession(who: Caller, seatId: string, deviceId: string): Promise<string> {
  const sessionId = randomUUID();
  const res = await who.send({
    method: "POST",
    path: `/api/seats/${seatId}/sessions`,
    ...json({ sessionId, stage: "coarse", deviceId, sampleRateHz: 8000, noiseFloorDb: -62 }),
  });
  expect(res.status).toBe(201);
  return sessionId;
}

async function upload(who: Caller, sessionId: string, bytes: Uint8Array): Promise<Response> {
  return who.send({
    method: "PUT",
    path: `/api/sessions/${sessionId}/recording`,
    headers: { "content-type": "audio/wav" },
    body: Buffer.from(bytes),
  });
}

/** Sets up one job's records as the person who may work on it. */
async function prepare(
  number: JobNumber,
  worker: Caller,
  codes: { seat: string; sessionSeat: string },
): Promise<JobRecords> {
  const { jobs } = await rhea.json<{ jobs: Array<{ id: string; number: string }> }>("/api/jobs");
  const jobId = jobs.find((j) => j.number === number)!.id;
  const page = await rhea.send({ path: `/jobs/${jobId}` });
  const html = await page.text();
  const seatId = seatOnMap(html, codes.seat);
  const sessionSeatId = seatOnMap(html, codes.sessionSeat);
  // One phone per seat: both sessions come from the same device.
  const device = `matrix-${number}-${randomUUID()}`;
  const sessionId = await startSession(worker, seatId, device);
  const endSessionId = await startSession(worker, seatId, device);
  expect((await upload(worker, sessionId, wav())).status).toBe(201);
  const photo = await worker.send({
    method: "POST",
    path: `/api/seats/${seatId}/photos`,
    headers: { "content-type": "image/png" },
    body: PNG,
  });
  expect(photo.status).toBe(201);
  const { id: photoId } = (await photo.json()) as { id: string };
  const seat = await rhea.json<{ head: { id: string } }>(`/api/seats/${seatId}`);
  // The job's customer, as the customers screen links to it.
  const customersHtml = await (await rhea.send({ path: "/customers" })).text();
  const customerName = (await rhea.json<{ jobs: Array<{ number: string; customerName: string }> }>("/api/jobs")).jobs.find((j) => j.number === number)!.customerName;
  const customerId = new RegExp(`href="/customers/([0-9a-f-]{36})"[^>]*>${customerName.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}<`).exec(customersHtml)![1]!;
  return {
    number,
    jobId,
    headId: seat.head.id,
    seatId,
    sessionSeatId,
    sessionId,
    endSessionId,
    photoId,
    customerId,
  };
}

beforeAll(async () => {
  await Promise.all([
    ines.signIn("ines@millrace.example"),
    rhea.signIn("rhea@millrace.example"),
    admin.signIn("admin@millrace.example"),
  ]);
  // Ines works on her own job; Dov's job is worked on by the supervisor (Dov's account is locked
  // by the sign-in tests, and a supervisor may work on any job of the shop).
  records["MHW-0141"] = await prepare("MHW-0141", ines, { seat: "3I2", sessionSeat: "3E2" });
  records["MHW-0142"] = await prepare("MHW-0142", rhea, { seat: "1I1", sessionSeat: "1E1" });
});

// ---------------------------------------------------------------- what the supervisor reads back

interface SeatApi {
  canWork: boolean;
  stages: Record<
    "coarse" | "fine",
    { sessions: Array<{ id: string; endedAt: string | null }>; strokes: unknown[] }
  >;
}
const seatReport = (seatId: string) => rhea.json<SeatApi>(`/api/seats/${seatId}`);
const sessionsOn = async (seatId: string) => {
  const s = await seatReport(seatId);
  return [...s.stages.coarse.sessions, ...s.stages.fine.sessions];
};
const auditTotal = async () => (await rhea.json<{ total: number }>("/api/audit")).total;
const recordingBytes = async (sessionId: string) => {
  const res = await rhea.send({ path: `/api/sessions/${sessionId}/recording` });
  expect(res.status).toBe(200);
  return (await res.arrayBuffer()).byteLength;
};

// ---------------------------------------------------------------- pages

function fill(pattern: string, r: JobRecords): string {
  return pattern.replace("[jobId]", r.jobId).replace("[seatId]", r.seatId).replace("[customerId]", r.customerId);
}

const READ_ONLY = "This seat is read-only for you";

async function expectPage(
  res: Response,
  path: string,
  expected: PageOutcome,
  r: JobRecords,
): Promise<void> {
  if (expected.startsWith("redirect:")) {
    expect(res.status).toBe(307);
    const to = new URL(res.headers.get("location")!, baseURL);
    expect(to.origin).toBe(baseURL);
    expect(to.pathname).toBe(expected.slice("redirect:".length));
    // The sign-in page sends the visitor back where they were going.
    if (expected === "redirect:/sign-in")
      expect(to.searchParams.get("callbackUrl")).toBe(path === "/" ? null : path);
    return;
  }
  // A page refused to the role answers 403 with our sentence; any other page 200.
  expect(res.status).toBe(expected === "forbidden" ? 403 : 200);
  const html = await res.text();
  // A 403 from forbidden() comes as the framework's error document titled by our
  // app/forbidden.tsx (its content is drawn from the page's flight data).
  const forbidden = html.includes('data-testid="forbidden"') || html.includes("<title>Not for your role · Grindfade</title>");
  // The not-found and forbidden boundaries mark their page noindex; a page that renders itself does not.
  if (expected !== "forbidden") expect(html).not.toMatch(/<meta name="robots" content="noindex"/);
  if (expected === "forbidden") {
    expect(forbidden).toBe(true);
    expect(html).toContain("Not for your role");
    return;
  }
  expect(forbidden).toBe(false);
  expect(html).toMatch(/<title>[^<]+ · Grindfade<\/title>|<title>Grindfade<\/title>/);
  // A job's pages show that job; a seat's pages show that seat's job.
  if (path.includes(r.jobId) || path.includes(r.seatId)) expect(html).toContain(r.number);
  if (path.startsWith("/bench/"))
    expect(html.includes(READ_ONLY)).toBe(expected === "page:read-only");
}

describe("pages", () => {
  for (const { pattern } of listPages()) {
    const row = PAGE_MATRIX[pattern];
    describe(pattern, () => {
      it("has a matrix row", () =>
        expect(row, "row in tests/security/role-matrix.ts").toBeDefined());
      if (!row) return;
      for (const p of PERSONAS) {
        it(`${p}: ${row[p]}`, async () => {
          const r = recordsOf(p);
          const path = fill(pattern, r);
          await expectPage(await CALLERS[p].send({ path }), path, row[p], r);
        });
      }
    });
  }
});

describe("the sign-in page sends a signed-in caller on within this site only", () => {
  // Each of these is read by browsers (WHATWG URL parsing) as a link to another site.
  for (const elsewhere of [
    "//elsewhere.example/x",
    "/\\elsewhere.example/x",
    "/\t/elsewhere.example/x",
    "https://elsewhere.example/x",
  ]) {
    it(`callbackUrl ${JSON.stringify(elsewhere)}: to the home page, which sends each role to its start`, async () => {
      const res = await ines.send({
        path: `/sign-in?callbackUrl=${encodeURIComponent(elsewhere)}`,
      });
      expect(res.status).toBe(307);
      const to = new URL(res.headers.get("location")!, baseURL);
      expect(to.origin).toBe(baseURL);
      expect(to.pathname).toBe("/");
    });
  }

  it("a path on this site is kept, with its query", async () => {
    const res = await ines.send({
      path: `/sign-in?callbackUrl=${encodeURIComponent("/jobs?mine=1")}`,
    });
    expect(res.status).toBe(307);
    const to = new URL(res.headers.get("location")!, baseURL);
    expect(`${to.origin}${to.pathname}${to.search}`).toBe(`${baseURL}/jobs?mine=1`);
  });
});

// ---------------------------------------------------------------- route handlers

interface Probe {
  request(p: Persona, r: JobRecords): Req;
  /** For mutating routes: what a refused call must leave as it was, read back by the supervisor. */
  state?(r: JobRecords): Promise<unknown>;
  /** Checks on an answer the gate let through. */
  allowed?(res: Response, p: Persona, r: JobRecords, before: unknown): Promise<void>;
  /** Checks on a refusal that is a page for people rather than JSON (the customer's report link). */
  refusedPage?(res: Response): Promise<void>;
}

const strokes = (n: number) =>
  Array.from({ length: n }, (_, k) => ({
    clientId: randomUUID(),
    index: k + 1,
    startS: 2 * (k + 1),
    endS: 2 * (k + 1) + 1.4,
    onsetDb: -21,
    bodyDb: -30,
    contrastDb: 9,
    flags: [],
  }));

/** Each persona's upload has a length of its own, so a refused one that got through would show. */
const personaWav = (p: Persona) => wav(40 * (PERSONAS.indexOf(p) + 1));

const PROBES: Record<string, Probe> = {
  "GET /r/[token]": {
    // A token that is no link: the same plain 404 for every caller, signed in or not (the link,
    // not a session, is the key; tests/e2e/customer-report.test.ts opens a real one).
    request: () => ({ path: `/r/${"Q".repeat(43)}` }),
    refusedPage: async (res) => {
      expect(res.headers.get("content-type")).toMatch(/^text\/html/);
      expect(await res.text()).toContain("There is no report at this address.");
    },
  },
  "GET /api/health": {
    request: () => ({ path: "/api/health" }),
    allowed: async (res) => expect(await res.json()).toMatchObject({ ok: true }),
  },
  "GET /api/auth/[...nextauth]": {
    request: () => ({ path: "/api/auth/session" }),
    allowed: async (res, p) => {
      const body = (await res.json()) as { user?: { email: string } };
      expect(body.user?.email ?? null).toBe(CALLERS[p].email);
    },
  },
  "POST /api/auth/[...nextauth]": {
    // A sign-out without next-auth's CSRF token: refused, and the session still holds.
    request: () => ({
      method: "POST",
      path: "/api/auth/signout",
      headers: { "content-type": "application/x-www-form-urlencoded" },
      body: "",
    }),
    allowed: async (res, p) => {
      expect(new URL(res.headers.get("location")!).searchParams.get("csrf")).toBe("true");
      const session = (await (await CALLERS[p].send({ path: "/api/auth/session" })).json()) as {
        user?: { email: string };
      };
      expect(session.user?.email ?? null).toBe(CALLERS[p].email);
    },
  },
  "GET /api/jobs": {
    request: () => ({ path: "/api/jobs" }),
    allowed: async (res) => {
      const { jobs } = (await res.json()) as { jobs: Array<{ number: string }> };
      expect(jobs.map((j) => j.number)).toEqual(
        expect.arrayContaining(["MHW-0141", "MHW-0142", "MHW-0143"]),
      );
    },
  },
  "GET /api/audit": {
    request: () => ({ path: "/api/audit" }),
    allowed: async (res) =>
      expect((await res.json()) as { entries: unknown[] }).toMatchObject({
        entries: expect.any(Array),
      }),
  },
  "GET /api/audit/csv": {
    request: () => ({ path: "/api/audit/csv" }),
    allowed: async (res) => {
      expect(res.headers.get("content-type")).toBe("text/csv; charset=utf-8");
      expect((await res.text()).replace(/^\uFEFF/, "").split("\r\n")[0]).toBe("when,person,entry,changes,job,seat,action,at_iso,entry_id");
    },
  },
  "GET /api/heads/[headId]/sheets": {
    request: (_p, r) => ({ path: `/api/heads/${r.headId}/sheets` }),
    allowed: async (res, _p, r) => {
      expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
      expect(res.headers.get("content-disposition")).toContain(`${r.number}-sheets.csv`);
    },
  },
  "GET /api/photos/[photoId]": {
    request: (_p, r) => ({ path: `/api/photos/${r.photoId}` }),
    allowed: async (res) => {
      expect(res.headers.get("content-type")).toBe("image/png");
      expect(Buffer.from(await res.arrayBuffer()).equals(PNG)).toBe(true);
    },
  },
  "GET /api/seats/[seatId]": {
    request: (_p, r) => ({ path: `/api/seats/${r.seatId}` }),
    // canWork says what the work routes will answer this caller.
    allowed: async (res, p) =>
      expect(((await res.json()) as SeatApi).canWork).toBe(
        isAllowed(ROUTE_MATRIX["POST /api/sessions/[sessionId]/strokes"]![p] as number),
      ),
  },
  "GET /api/seats/[seatId]/photos": {
    request: (_p, r) => ({ path: `/api/seats/${r.seatId}/photos` }),
    allowed: async (res, _p, r) => {
      const { photos } = (await res.json()) as { photos: Array<{ id: string }> };
      expect(photos.map((x) => x.id)).toContain(r.photoId);
    },
  },
  "GET /api/seats/[seatId]/checks": {
    request: (_p, r) => ({ path: `/api/seats/${r.seatId}/checks` }),
    allowed: async (res, _p, r) => {
      const body = (await res.json()) as { seatId: string; latest: Record<string, unknown> };
      expect(body.seatId).toBe(r.seatId);
      expect(Object.keys(body.latest).sort()).toEqual(["contact_ring", "leak_test", "marking_compound"]);
    },
  },
  "POST /api/seats/[seatId]/photos": {
    request: (_p, r) => ({
      method: "POST",
      path: `/api/seats/${r.seatId}/photos`,
      headers: { "content-type": "image/png" },
      body: PNG,
    }),
    state: async (r) =>
      (await rhea.json<{ photos: unknown[] }>(`/api/seats/${r.seatId}/photos`)).photos.length,
    allowed: async (_res, _p, r, before) =>
      expect(
        (await rhea.json<{ photos: unknown[] }>(`/api/seats/${r.seatId}/photos`)).photos.length,
      ).toBe((before as number) + 1),
  },
  "POST /api/seats/[seatId]/sessions": {
    request: (p, r) => ({
      method: "POST",
      path: `/api/seats/${r.sessionSeatId}/sessions`,
      ...json({
        sessionId: randomUUID(),
        stage: "coarse",
        deviceId: `matrix-${p}-phone`,
        sampleRateHz: 8000,
        noiseFloorDb: -62,
      }),
    }),
    state: async (r) => (await sessionsOn(r.sessionSeatId)).length,
    allowed: async (_res, _p, r, before) =>
      expect((await sessionsOn(r.sessionSeatId)).length).toBe((before as number) + 1),
  },
  "POST /api/sessions/[sessionId]/end": {
    request: (_p, r) => ({ method: "POST", path: `/api/sessions/${r.endSessionId}/end` }),
    state: async (r) => (await sessionsOn(r.seatId)).find((s) => s.id === r.endSessionId)!.endedAt,
    allowed: async (_res, _p, r) =>
      expect(
        (await sessionsOn(r.seatId)).find((s) => s.id === r.endSessionId)!.endedAt,
      ).not.toBeNull(),
  },
  "POST /api/sessions/[sessionId]/strokes": {
    request: (_p, r) => ({
      method: "POST",
      path: `/api/sessions/${r.sessionId}/strokes`,
      ...json({ strokes: strokes(2) }),
    }),
    state: async (r) => (await seatReport(r.seatId)).stages.coarse.strokes.length,
    allowed: async (res, _p, r, before) => {
      expect(await res.json()).toMatchObject({ accepted: 2, duplicates: 0 });
      expect((await seatReport(r.seatId)).stages.coarse.strokes.length).toBe(
        (before as number) + 2,
      );
    },
  },
  "GET /api/sessions/[sessionId]/recording": {
    request: (_p, r) => ({ path: `/api/sessions/${r.sessionId}/recording` }),
    allowed: async (res) => {
      expect(res.headers.get("content-type")).toBe("audio/wav");
      expect(
        Buffer.from(await res.arrayBuffer())
          .subarray(0, 4)
          .toString("latin1"),
      ).toBe("RIFF");
    },
  },
  "PUT /api/sessions/[sessionId]/recording": {
    request: (p, r) => ({
      method: "PUT",
      path: `/api/sessions/${r.sessionId}/recording`,
      headers: { "content-type": "audio/wav" },
      body: Buffer.from(personaWav(p)),
    }),
    state: (r) => recordingBytes(r.sessionId),
    allowed: async (_res, p, r) =>
      expect(await recordingBytes(r.sessionId)).toBe(personaWav(p).byteLength),
  },
  "GET /api/sessions/[sessionId]/recording/chunks": {
    request: (_p, r) => ({ path: `/api/sessions/${r.sessionId}/recording/chunks` }),
    allowed: async (res) =>
      expect(await res.json()).toMatchObject({ received: expect.any(Number) }),
  },
  "HEAD /api/sessions/[sessionId]/recording/chunks": {
    request: (_p, r) => ({ method: "HEAD", path: `/api/sessions/${r.sessionId}/recording/chunks` }),
    allowed: async (res) => expect(res.headers.get("upload-offset")).toMatch(/^\d+$/),
  },
  "PUT /api/sessions/[sessionId]/recording/chunks": {
    // One chunk holding the whole file: it completes the upload.
    request: (p, r) => {
      const bytes = personaWav(p);
      return {
        method: "PUT",
        path: `/api/sessions/${r.sessionId}/recording/chunks`,
        headers: {
          "content-type": "application/octet-stream",
          "content-range": `bytes 0-${bytes.byteLength - 1}/${bytes.byteLength}`,
        },
        body: Buffer.from(bytes),
      };
    },
    state: (r) => recordingBytes(r.sessionId),
    allowed: async (_res, p, r) =>
      expect(await recordingBytes(r.sessionId)).toBe(personaWav(p).byteLength),
  },
};

/** Refused personas first, so each allowed change comes after every refusal was checked. */
const refusedFirst = (row: Record<Persona, number>) =>
  [...PERSONAS].sort((a, b) => Number(isAllowed(row[a])) - Number(isAllowed(row[b])));

describe("route handlers", () => {
  for (const { pattern, methods } of listRouteHandlers()) {
    for (const method of methods) {
      const key = `${method} ${pattern}`;
      const row = ROUTE_MATRIX[key];
      const probe = PROBES[key];
      describe(key, () => {
        it("has a matrix row and a probe here", () => {
          expect(row, "row in tests/security/role-matrix.ts").toBeDefined();
          expect(probe, "probe in this file").toBeDefined();
        });
        if (!row || !probe) return;
        for (const p of refusedFirst(row)) {
          const expected = row[p];
          it(`${p}: ${expected}`, async () => {
            const r = recordsOf(p);
            const before = probe.state ? await probe.state(r) : undefined;
            const auditBefore = probe.state ? await auditTotal() : undefined;
            const res = await CALLERS[p].send(probe.request(p, r));
            expect(res.status).toBe(expected);
            if (isAllowed(expected) || expected === 302) {
              await probe.allowed?.(res, p, r, before);
              return;
            }
            if (probe.refusedPage) await probe.refusedPage(res);
            else if (method !== "HEAD") {
              const body = (await res.json()) as { error: string; message: string };
              expect(body).toMatchObject({
                error: expected === 401 ? "unauthorized" : "forbidden",
                message: expect.any(String),
              });
            }
            if (probe.state) {
              expect(await probe.state(r), "a refused call leaves the record as it was").toEqual(
                before,
              );
              expect(await auditTotal(), "a refused call writes no audit entry").toBe(auditBefore);
            }
          });
        }
      });
    }
  }
});

describe("an id that names nothing in the caller's shop", () => {
  // Another shop's record answers exactly as a missing one: the queries are scoped to the shop.
  // In-process checks with a real second shop are in tests/security/action-matrix.test.ts.
  const nowhere = (): JobRecords => ({
    number: "none",
    jobId: randomUUID(),
    headId: randomUUID(),
    seatId: randomUUID(),
    sessionSeatId: randomUUID(),
    sessionId: randomUUID(),
    endSessionId: randomUUID(),
    photoId: randomUUID(),
    customerId: randomUUID(),
  });

  for (const { pattern } of listPages().filter((x) => x.pattern.includes("Id]"))) {
    it(`page ${pattern}: the not-found page, for the supervisor`, async () => {
      const res = await rhea.send({ path: fill(pattern, nowhere()) });
      // Checked before any loading state starts the answer, so the status is a real 404.
      expect(res.status).toBe(404);
      const html = await res.text();
      expect(html).toMatch(/<meta name="robots" content="noindex"/);
      expect(html).not.toContain('data-testid="forbidden"');
      // An id that is not even one answers the same.
      const odd = await rhea.send({ path: pattern.replace("[jobId]", "not-an-id").replace("[seatId]", "2I1").replace("[customerId]", "not-an-id") });
      expect(odd.status).toBe(404);
    });
  }

  for (const { pattern, methods } of listRouteHandlers().filter((x) => x.pattern.includes("Id]"))) {
    for (const method of methods) {
      const key = `${method} ${pattern}`;
      it(`${key}: 404, for the supervisor`, async () => {
        const res = await rhea.send(PROBES[key]!.request("supervisor", nowhere()));
        expect(res.status).toBe(404);
        if (method !== "HEAD") expect(await res.json()).toMatchObject({ error: "not_found" });
      });
    }
  }
});
