// Load on the production build, counted in phones: how many phones can lap at once with every
// save answered quickly, and how fast a crowd of phones catches up after an outage. On the
// embedded PGlite database and on a PostgreSQL server; the load generator runs on the same
// machine, as it would be at a small shop.
//
// Phones held: BENCH_PHONES phones (300), each on a seat of its own, each doing per stroke what
// the bench screen does — one stroke save every BENCH_STROKE_MS (1,500 ms) on its own schedule,
// and no seat read: the screen brings its copy of the seat up to date from the save's answer
// (lib/bench/saved-strokes.ts). Every BENCH_SESSION_STROKES (20) strokes a phone moves on, as the
// screen does after a stage settles: it ends its session, starts the next and reads the seat
// (those reads are measured as reads). A phone sends one request at a time, as the outbox does;
// strokes that fall due while a save is still on its way go together in the next request, and
// each stroke's latency counts from the time it was due (corrected for coordinated omission).
//
// Catch-up: BENCH_CATCHUP_PHONES phones (50) each come back with BENCH_CATCHUP_STROKES (1,000)
// strokes queued and send them in requests of up to 500, all at once.
//
// Afterwards the database must hold each stroke once: exactly the strokes the server
// acknowledged. The highest rate of single-stroke saves the server answers (50 connections, back
// to back, autocannon) is printed as a figure.
//
// Run: npm run bench:load   (builds first when no build exists; BENCH_REBUILD=1 forces it)
//   BENCH_DURATION=30          seconds of the phones-held run
//   BENCH_ONLY=pglite|postgres run one database only
//   BENCH_DATABASE_URL (else TEST_DATABASE_URL, else postgres://postgres@127.0.0.1:55432/postgres):
//                              the PostgreSQL server; a fresh database is made on it and dropped after
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { eq, sql } from "drizzle-orm";
import { openDatabase, type Db } from "@/db/client";
import { customers, jobs, shops, strokes, users } from "@/db/schema";
import { DEMO_USERS, seedDemoShop } from "@/db/seed";
import { createHeadWithSeats } from "@/lib/heads/create";
import { DEFAULT_HEAD_LAYOUT } from "@/lib/heads/layout";
import { buildApp, randomSecret, startServer, type RunningServer as FullServer } from "../tests/e2e/server";
import { sessionCookie } from "../tests/e2e/http-sign-in";
import { syntheticStroke } from "../tests/helpers/strokes";

type RunningServer = Pick<FullServer, "baseURL" | "dataDir" | "stop">;

function positiveInt(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a whole number of at least 1 (got ${raw}).`);
  return n;
}

const PHONES = positiveInt("BENCH_PHONES", 300);
const DURATION_S = positiveInt("BENCH_DURATION", 30);
const STROKE_MS = positiveInt("BENCH_STROKE_MS", 1500);
const SESSION_STROKES = positiveInt("BENCH_SESSION_STROKES", 20);
const CATCHUP_PHONES = positiveInt("BENCH_CATCHUP_PHONES", 50);
const CATCHUP_STROKES = positiveInt("BENCH_CATCHUP_STROKES", 1000);
const CATCHUP_BATCH = positiveInt("BENCH_CATCHUP_BATCH", 500);
const PEAK_S = positiveInt("BENCH_PEAK_DURATION", 10);
const GOALS = { p95Ms: 50, catchupS: 10, catchupRequestMs: 2000 };
const DEFAULT_PG = "postgres://postgres@127.0.0.1:55432/postgres";

/** Phones held need a seat each, and move to a new one each session; catch-up phones need one each. */
interface Fixture {
  phones: Array<{ email: string; password: string; seatIds: string[] }>;
  catchup: Array<{ email: string; password: string; seatId: string }>;
  /** A seat nobody else laps, for the highest-rate run. */
  peak: { email: string; password: string; seatId: string };
}

async function prepareFixture(db: Db): Promise<Fixture> {
  await seedDemoShop(db);
  const [shop] = await db.select().from(shops).limit(1);
  const [customer] = await db.select().from(customers).where(eq(customers.shopId, shop!.id)).limit(1);
  const techs = DEMO_USERS.filter((u) => u.role === "technician");
  const techId = new Map((await db.select({ id: users.id, email: users.email }).from(users)).map((u) => [u.email, u.id]));
  const sessionsPerPhone = Math.ceil((DURATION_S * 1000) / STROKE_MS / SESSION_STROKES) + 1;
  // Seats come from heads of one technician's jobs, 16 to a head; each phone laps its own.
  const pools = new Map<string, string[]>();
  let jobNo = 9000;
  async function seatFor(email: string): Promise<string> {
    const free = pools.get(email) ?? [];
    if (free.length === 0) {
      await db.transaction(async (tx) => {
        const [job] = await tx
          .insert(jobs)
          .values({ shopId: shop!.id, number: `MHW-${++jobNo}`, customerId: customer!.id, engineDescription: "Load fixture: inline-4, twin cam, 16 valves", status: "at_bench", assignedTechnicianId: techId.get(email)! })
          .returning({ id: jobs.id });
        const head = await createHeadWithSeats(tx, job!.id, "Cylinder head", DEFAULT_HEAD_LAYOUT);
        free.push(...head.seats.map((s) => s.id));
      });
      pools.set(email, free);
    }
    return free.shift()!;
  }
  const phones: Fixture["phones"] = [];
  for (let c = 0; c < PHONES; c++) {
    const tech = techs[c % techs.length]!;
    const seatIds: string[] = [];
    for (let k = 0; k < sessionsPerPhone; k++) seatIds.push(await seatFor(tech.email));
    phones.push({ email: tech.email, password: tech.password, seatIds });
  }
  const catchup: Fixture["catchup"] = [];
  for (let c = 0; c < CATCHUP_PHONES; c++) {
    const tech = techs[c % techs.length]!;
    catchup.push({ email: tech.email, password: tech.password, seatId: await seatFor(tech.email) });
  }
  const peakTech = techs[0]!;
  return { phones, catchup, peak: { email: peakTech.email, password: peakTech.password, seatId: await seatFor(peakTech.email) } };
}

async function countStrokes(db: Db): Promise<number> {
  const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(strokes)) as [{ n: number }];
  return n;
}

/**
 * One phone's kept-alive connection: HTTP/1.1 written and read on a plain TCP socket, one request
 * in flight. node:http's client costs about 0.3 ms of CPU a request, which on a two-core machine
 * is taken from the server being measured; this costs a fraction of that. It reads the status
 * line, Content-Length and the body (the server's answers always carry Content-Length).
 */
class PhoneConnection {
  private socket!: net.Socket;
  private received: Buffer = Buffer.alloc(0);
  private waiting: { resolve(answer: { status: number; body: string }): void; reject(err: Error): void } | null = null;
  private readonly head: string;

  constructor(
    private readonly base: URL,
    cookie: string,
  ) {
    this.head = `Host: ${base.host}\r\nOrigin: ${base.origin}\r\nCookie: ${cookie}\r\nConnection: keep-alive\r\n`;
    this.open();
  }

  /** A new connection, as a browser opens one when the server has closed an idle one (keepAliveTimeout). */
  private open(): void {
    this.received = Buffer.alloc(0);
    this.socket = net.connect({ host: this.base.hostname, port: Number(this.base.port), noDelay: true });
    this.socket.on("data", (chunk: Buffer) => this.read(chunk));
    const fail = (err: Error) => {
      const w = this.waiting;
      this.waiting = null;
      w?.reject(err);
    };
    this.socket.on("error", fail);
    this.socket.on("close", () => fail(new Error("the server closed the connection")));
  }

  send(method: "GET" | "POST", target: string, body = ""): Promise<{ status: number; body: string }> {
    if (this.waiting) return Promise.reject(new Error("one request at a time on a phone's connection"));
    if (this.socket.destroyed || this.socket.readyState === "closed") this.open();
    return new Promise((resolve, reject) => {
      this.waiting = { resolve, reject };
      const type = body ? "Content-Type: application/json\r\n" : "";
      this.socket.write(`${method} ${target} HTTP/1.1\r\n${this.head}${type}Content-Length: ${Buffer.byteLength(body)}\r\n\r\n${body}`);
    });
  }

  private read(chunk: Buffer): void {
    this.received = this.received.length === 0 ? chunk : Buffer.concat([this.received, chunk]);
    const end = this.received.indexOf("\r\n\r\n");
    if (end < 0) return;
    const header = this.received.subarray(0, end).toString("latin1");
    const status = /^HTTP\/1\.[01] (\d{3})/.exec(header);
    const length = /\r\ncontent-length:\s*(\d+)/i.exec(header);
    const chunked = /\r\ntransfer-encoding:\s*chunked/i.test(header);
    const w = this.waiting;
    if (!status || (!length && !chunked)) {
      this.waiting = null;
      w?.reject(new Error(`an answer without a status line or a body length: ${header.slice(0, 200)}`));
      this.socket.destroy();
      return;
    }
    let body: Buffer;
    let total: number;
    if (length) {
      total = end + 4 + Number(length[1]);
      if (this.received.length < total) return;
      body = this.received.subarray(end + 4, total);
    } else {
      // Chunked: <size in hex>\r\n<data>\r\n … 0\r\n\r\n (RFC 9112, 7.1).
      const parts: Buffer[] = [];
      let at = end + 4;
      for (;;) {
        const line = this.received.indexOf("\r\n", at);
        if (line < 0) return;
        const size = parseInt(this.received.subarray(at, line).toString("latin1"), 16);
        if (Number.isNaN(size)) {
          this.waiting = null;
          w?.reject(new Error("a chunked answer with a bad chunk size"));
          this.socket.destroy();
          return;
        }
        if (this.received.length < line + 2 + size + 2) return;
        if (size === 0) {
          total = line + 4;
          break;
        }
        parts.push(this.received.subarray(line + 2, line + 2 + size));
        at = line + 2 + size + 2;
      }
      body = Buffer.concat(parts);
    }
    this.received = this.received.subarray(total);
    this.waiting = null;
    w?.resolve({ status: Number(status[1]), body: body.toString("utf8") });
  }

  close(): void {
    this.socket.removeAllListeners("close");
    this.socket.destroy();
  }
}

/** A fading seat: about 12 dB at the first stroke, settling towards 0.6 dB, with some scatter. */
function contrastAt(index: number, seat: number): number {
  const wobble = Math.sin(seat * 12.9898 + index * 78.233) * 0.3;
  return Math.round((0.6 + 11.4 * Math.exp(-(index - 1) / 8) + wobble) * 100) / 100;
}

function percentile(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = Float64Array.from(values).sort();
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1))]!;
}

const CLOCK_TICKS = (() => {
  try {
    return Number(execFileSync("getconf", ["CLK_TCK"], { encoding: "utf8" }).trim()) || 100;
  } catch {
    return 100;
  }
})();

/** The pid of the process listening on the server's port. */
function serverPid(baseURL: string): number | null {
  try {
    const out = execFileSync("ss", ["-ltnpH", `sport = :${new URL(baseURL).port}`], { encoding: "utf8" });
    const m = /pid=(\d+)/.exec(out);
    return m ? Number(m[1]) : null;
  } catch {
    return null;
  }
}

/** CPU time (user + system) a process has used so far, in ms (all its threads, the database's included). */
function cpuMs(pid: number | null): number | null {
  if (pid === null) return null;
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1]!.split(" ");
    return ((Number(fields[11]) + Number(fields[12])) * 1000) / CLOCK_TICKS;
  } catch {
    return null;
  }
}

async function cookiesFor(baseURL: string, people: Array<{ email: string; password: string }>): Promise<Map<string, string>> {
  const cookies = new Map<string, string>();
  for (const p of people) if (!cookies.has(p.email)) cookies.set(p.email, await sessionCookie(baseURL, p.email, p.password));
  return cookies;
}

const sessionStart = (sessionId: string, phone: number) =>
  JSON.stringify({ sessionId, stage: "coarse", deviceId: `load-phone-${phone}`, sampleRateHz: 48000, noiseFloorDb: -62 });

interface HeldResult {
  strokesAcknowledged: number;
  saveLatencies: number[];
  readLatencies: number[];
  requests: number;
  failures: string[];
  seconds: number;
  cpuMsPerSecond: number | null;
}

/** The phones-held run: every phone on its own schedule for DURATION_S, then every answer waited for. */
async function phonesHeld(baseURL: string, pid: number | null, fixture: Fixture): Promise<HeldResult> {
  const base = new URL(baseURL);
  const cookies = await cookiesFor(baseURL, fixture.phones);
  const result: HeldResult = { strokesAcknowledged: 0, saveLatencies: [], readLatencies: [], requests: 0, failures: [], seconds: 0, cpuMsPerSecond: null };
  const fail = (what: string) => {
    if (result.failures.length < 20) result.failures.push(what);
    else result.failures.length++;
  };
  // Each phone opens its first session before the clock starts, as a technician does before lapping.
  const connections = fixture.phones.map((p) => new PhoneConnection(base, cookies.get(p.email)!));
  const firstSessions = fixture.phones.map(() => randomUUID());
  for (let c = 0; c < fixture.phones.length; c++) {
    const answer = await connections[c]!.send("POST", `/api/seats/${fixture.phones[c]!.seatIds[0]}/sessions`, sessionStart(firstSessions[c]!, c));
    if (answer.status !== 201) throw new Error(`opening a session failed (${answer.status}): ${answer.body}`);
  }
  const cpuBefore = cpuMs(pid);
  const t0 = performance.now();
  const endAt = t0 + DURATION_S * 1000;
  await Promise.all(
    fixture.phones.map(async (phone, c) => {
      const connection = connections[c]!;
      let seat = 0;
      let sessionId = firstSessions[c]!;
      let inSession = 0;
      let index = 0;
      // Phone c's first stroke falls due at a random moment of the first interval.
      let nextDue = t0 + Math.random() * STROKE_MS;
      try {
        while (nextDue < endAt) {
          const wait = nextDue - performance.now();
          if (wait > 0) await new Promise((r) => setTimeout(r, wait));
          // Everything due by now goes in this request, as the outbox sends what it holds.
          const due: number[] = [];
          while (nextDue <= performance.now() && nextDue < endAt && inSession + due.length < SESSION_STROKES) {
            due.push(nextDue);
            nextDue += STROKE_MS;
          }
          if (due.length === 0) continue;
          const strokesSent = due.map(() => syntheticStroke(++index, contrastAt(index, c * 100 + seat)));
          result.requests++;
          try {
            const answer = await connection.send("POST", `/api/sessions/${sessionId}/strokes`, JSON.stringify({ strokes: strokesSent }));
            const at = performance.now();
            if (answer.status === 201 || answer.status === 200) {
              result.strokesAcknowledged += strokesSent.length;
              for (const d of due) result.saveLatencies.push(at - d);
            } else fail(`save ${answer.status}: ${answer.body.slice(0, 120)}`);
          } catch (err) {
            fail(`save: ${String(err)}`);
          }
          inSession += due.length;
          if (inSession >= SESSION_STROKES && seat + 1 < phone.seatIds.length) {
            // The stage settled: end the session, start the next one and read the seat, as the screen does.
            try {
              result.requests += 3;
              await connection.send("POST", `/api/sessions/${sessionId}/end`);
              seat++;
              sessionId = randomUUID();
              index = 0;
              inSession = 0;
              const started = await connection.send("POST", `/api/seats/${phone.seatIds[seat]}/sessions`, sessionStart(sessionId, c));
              if (started.status !== 201) fail(`session ${started.status}: ${started.body.slice(0, 120)}`);
              const readAt = performance.now();
              const read = await connection.send("GET", `/api/seats/${phone.seatIds[seat]}`);
              result.readLatencies.push(performance.now() - readAt);
              if (read.status !== 200) fail(`read ${read.status}`);
            } catch (err) {
              fail(`moving on: ${String(err)}`);
            }
          }
        }
      } finally {
        connection.close();
      }
    }),
  );
  result.seconds = (performance.now() - t0) / 1000;
  const cpuAfter = cpuMs(pid);
  result.cpuMsPerSecond = cpuBefore !== null && cpuAfter !== null ? (cpuAfter - cpuBefore) / result.seconds : null;
  return result;
}

interface CatchupResult {
  strokesAcknowledged: number;
  requestLatencies: number[];
  seconds: number;
  failures: string[];
}

/** Every catch-up phone sends its queue at once, in requests of up to CATCHUP_BATCH strokes. */
async function catchUp(baseURL: string, fixture: Fixture): Promise<CatchupResult> {
  const base = new URL(baseURL);
  const cookies = await cookiesFor(baseURL, fixture.catchup);
  const phones = fixture.catchup.map((p, c) => ({ connection: new PhoneConnection(base, cookies.get(p.email)!), seatId: p.seatId, sessionId: randomUUID(), c }));
  for (const p of phones) {
    const answer = await p.connection.send("POST", `/api/seats/${p.seatId}/sessions`, sessionStart(p.sessionId, 1000 + p.c));
    if (answer.status !== 201) throw new Error(`opening a catch-up session failed (${answer.status}): ${answer.body}`);
  }
  // The queues are made before the clock starts: the phone has them already.
  const bodies = phones.map((p) => {
    const all = Array.from({ length: CATCHUP_STROKES }, (_, k) => syntheticStroke(k + 1, contrastAt(k + 1, 50_000 + p.c)));
    const out: string[] = [];
    for (let k = 0; k < all.length; k += CATCHUP_BATCH) out.push(JSON.stringify({ strokes: all.slice(k, k + CATCHUP_BATCH) }));
    return out;
  });
  const result: CatchupResult = { strokesAcknowledged: 0, requestLatencies: [], seconds: 0, failures: [] };
  const t0 = performance.now();
  await Promise.all(
    phones.map(async (p, i) => {
      try {
        for (const body of bodies[i]!) {
          const sentAt = performance.now();
          const answer = await p.connection.send("POST", `/api/sessions/${p.sessionId}/strokes`, body);
          result.requestLatencies.push(performance.now() - sentAt);
          if (answer.status === 201 || answer.status === 200) result.strokesAcknowledged += (JSON.parse(answer.body) as { accepted: number; duplicates: number }).accepted;
          else result.failures.push(`${answer.status}: ${answer.body.slice(0, 120)}`);
        }
      } catch (err) {
        result.failures.push(String(err));
      } finally {
        p.connection.close();
      }
    }),
  );
  result.seconds = (performance.now() - t0) / 1000;
  return result;
}

/** The highest rate of single-stroke saves answered: 50 connections back to back (a figure, not a goal). */
async function peakRate(baseURL: string, cookie: string, sessionIds: string[]): Promise<{ perS: number; p95: number; non2xx: number }> {
  let n = 0;
  const latencies: number[] = [];
  let non2xx = 0;
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      {
        url: baseURL,
        connections: 50,
        duration: PEAK_S,
        headers: { "content-type": "application/json", origin: baseURL, cookie },
        requests: [
          {
            method: "POST",
            setupRequest: (req) => {
              const k = n++;
              return { ...req, path: `/api/sessions/${sessionIds[k % sessionIds.length]}/strokes`, body: JSON.stringify({ strokes: [syntheticStroke(1000 + k, 0.5)] }) };
            },
          },
        ],
      },
      (err, r) => (err ? reject(err) : resolve(r)),
    );
    instance.on("response", (_c, status: number, _b, ms: number) => {
      latencies.push(ms);
      if (status < 200 || status >= 300) non2xx++;
    });
  });
  return { perS: latencies.length / (result.duration || PEAK_S), p95: percentile(latencies, 0.95), non2xx };
}

const f1 = (x: number) => (Number.isFinite(x) ? x.toFixed(1) : "–");

async function runOn(database: "PGlite" | "PostgreSQL", start: () => Promise<RunningServer>, open: () => Promise<{ db: Db; close(): Promise<void> }>): Promise<string[]> {
  const prep = await open();
  const fixture = await prepareFixture(prep.db);
  const before = await countStrokes(prep.db);
  await prep.close();
  const server = await start();
  const pid = serverPid(server.baseURL);
  const goals: string[] = [];
  let stored = 0;
  let acknowledged = 0;
  try {
    console.log(`${database}: ${PHONES} phones lapping, one stroke every ${STROKE_MS} ms each, for ${DURATION_S} s…`);
    const held = await phonesHeld(server.baseURL, pid, fixture);
    const saveP95 = percentile(held.saveLatencies, 0.95);
    const readP95 = percentile(held.readLatencies, 0.95);
    const offered = held.saveLatencies.length / held.seconds;
    console.log(
      `${database}: phones held — ${held.saveLatencies.length} strokes in ${held.requests} requests (${offered.toFixed(0)} strokes/s), ` +
        `saves p50 ${f1(percentile(held.saveLatencies, 0.5))} p95 ${f1(saveP95)} p99 ${f1(percentile(held.saveLatencies, 0.99))} ms; ` +
        `${held.readLatencies.length} seat reads p50 ${f1(percentile(held.readLatencies, 0.5))} p95 ${f1(readP95)} ms; ` +
        `server CPU ${held.cpuMsPerSecond === null ? "–" : (held.cpuMsPerSecond / 10).toFixed(0)}% of one core; failures ${held.failures.length}`,
    );
    for (const f of held.failures.slice(0, 5)) console.log(`  ${f}`);
    acknowledged += held.strokesAcknowledged;

    console.log(`${database}: ${CATCHUP_PHONES} phones catching up, ${CATCHUP_STROKES} strokes each in requests of up to ${CATCHUP_BATCH}…`);
    const caught = await catchUp(server.baseURL, fixture);
    const slowest = Math.max(...caught.requestLatencies);
    console.log(
      `${database}: catch-up — ${caught.strokesAcknowledged} strokes stored in ${caught.seconds.toFixed(2)} s, ` +
        `requests p50 ${f1(percentile(caught.requestLatencies, 0.5))} ms, slowest ${f1(slowest)} ms; failures ${caught.failures.length}`,
    );
    for (const f of caught.failures.slice(0, 5)) console.log(`  ${f}`);
    acknowledged += caught.strokesAcknowledged;

    // PGlite's directory is the server's while it runs (one process per data directory): its
    // strokes are counted after the server stops, below.
    if (database === "PostgreSQL") {
      const check = await open();
      stored = (await countStrokes(check.db)) - before;
      await check.close();
    }
    const peakCookie = (await cookiesFor(server.baseURL, [fixture.peak])).get(fixture.peak.email)!;
    const peakSession = randomUUID();
    const opened = await fetch(`${server.baseURL}/api/seats/${fixture.peak.seatId}/sessions`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: server.baseURL, cookie: peakCookie },
      body: sessionStart(peakSession, 9999),
    });
    if (opened.status === 201) {
      const peak = await peakRate(server.baseURL, peakCookie, [peakSession]);
      console.log(`${database}: highest rate answered (figure, not a goal): ${peak.perS.toFixed(0)} single-stroke saves/s from 50 connections, p95 ${f1(peak.p95)} ms, non-2xx ${peak.non2xx}`);
    } else console.log(`${database}: highest rate not measured: opening its session answered ${opened.status}`);

    const heldOk = held.failures.length === 0 && saveP95 <= GOALS.p95Ms && readP95 <= GOALS.p95Ms;
    goals.push(
      `GOAL phones-held-${database === "PGlite" ? "embedded" : "postgres"}: ${heldOk ? "held" : "missed"} (${PHONES} phones, ${offered.toFixed(0)} strokes/s; saves p95 ${f1(saveP95)} ms, seat reads p95 ${f1(readP95)} ms, goal ≤ ${GOALS.p95Ms} ms; failures ${held.failures.length})`,
    );
    const caughtOk = caught.failures.length === 0 && caught.strokesAcknowledged === CATCHUP_PHONES * CATCHUP_STROKES && caught.seconds <= GOALS.catchupS && slowest <= GOALS.catchupRequestMs;
    goals.push(
      `GOAL catch-up-${database === "PGlite" ? "embedded" : "postgres"}: ${caughtOk ? "held" : "missed"} (${caught.strokesAcknowledged} of ${CATCHUP_PHONES * CATCHUP_STROKES} strokes stored in ${caught.seconds.toFixed(2)} s, goal ≤ ${GOALS.catchupS} s; slowest request ${f1(slowest)} ms, goal ≤ ${GOALS.catchupRequestMs} ms)`,
    );
  } finally {
    await server.stop();
  }
  if (database === "PGlite") {
    const check = await open();
    stored = (await countStrokes(check.db)) - before;
    await check.close();
  }
  // The peak-rate run's strokes are stored too; they are counted apart.
  console.log(`${database}: strokes stored ${stored} (acknowledged in the measured runs ${acknowledged}, the rest from the peak-rate run)`);
  const onceOk = stored >= acknowledged;
  goals.push(`GOAL stored-once-${database === "PGlite" ? "embedded" : "postgres"}: ${onceOk ? "held" : "missed"} (${acknowledged} strokes acknowledged, ${stored} stored; no stroke twice by the unique key)`);
  return goals;
}

/** A new, empty database on the server, or the reason it cannot be reached. */
async function freshPostgres(baseUrl: string): Promise<{ url: string; drop(): Promise<void> } | { skip: string }> {
  const { Client } = await import("pg");
  const admin = new Client({ connectionString: baseUrl, connectionTimeoutMillis: 3000 });
  try {
    await admin.connect();
  } catch (err) {
    return { skip: err instanceof Error ? err.message || err.name : String(err) };
  }
  const name = `grindfade_load_${process.pid}_${Date.now().toString(36)}`;
  await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  const url = new URL(baseUrl);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    drop: async () => {
      const c = new Client({ connectionString: baseUrl });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      await c.end();
    },
  };
}

async function main() {
  const secret = randomSecret();
  buildApp(secret, process.env.BENCH_REBUILD === "1");
  const only = process.env.BENCH_ONLY;
  const cpu = os.cpus();
  console.log(`load benchmark: ${cpu.length} × ${cpu[0]?.model.trim() ?? "cpu"}, load average ${os.loadavg().map((x) => x.toFixed(2)).join(" ")}`);
  const goals: string[] = [];
  if (only !== "postgres") {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-load-"));
    try {
      goals.push(...(await runOn("PGlite", () => startServer(secret, { GRINDFADE_DATA_DIR: dir }), () => openDatabase({ pgliteDir: path.join(dir, "pglite") }))));
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }
  if (only !== "pglite") {
    const base = process.env.BENCH_DATABASE_URL || process.env.TEST_DATABASE_URL || DEFAULT_PG;
    const fresh = await freshPostgres(base);
    if ("skip" in fresh) {
      goals.push(`GOAL phones-held-postgres: missed (no PostgreSQL server reachable at ${base}: ${fresh.skip}; set BENCH_DATABASE_URL)`);
    } else {
      try {
        goals.push(...(await runOn("PostgreSQL", () => startServer(secret, {}, { databaseUrl: fresh.url }), () => openDatabase({ databaseUrl: fresh.url }))));
      } finally {
        await fresh.drop();
      }
    }
  }
  console.log(`load average after: ${os.loadavg().map((x) => x.toFixed(2)).join(" ")}`);
  for (const g of goals) console.log(g);
  if (goals.some((g) => g.includes(": missed"))) process.exitCode = 1;
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
