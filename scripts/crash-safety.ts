// Crash safety of stroke saves on the embedded database. For each of SIGKILL and SIGTERM: start
// the production build on PGlite with a fresh data directory, post strokes one per request from
// concurrent phones (each stroke with its own clientId, as the bench outbox sends them), stop the
// server with the signal about halfway, start it again on the same directory, and check through
// the API that every stroke that got a success answer is there and none is there twice; then
// resend every stroke that got no success answer, as the outbox does, and check again that each
// stroke is there exactly once. After SIGTERM the database must have been closed cleanly.
// Run: npm run crash-safety   (builds first when no build exists). Exits non-zero on failure.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { DEMO_USERS } from "@/db/seed";
import { buildApp, randomSecret, startServer, type RunningServer } from "../tests/e2e/server";
import { clusterState as pgControlState } from "../tests/helpers/pg-control";
import { sessionCookie } from "../tests/e2e/http-sign-in";
import { syntheticStroke } from "../tests/helpers/strokes";
import type { StrokeInput } from "@/lib/validations/bench";

export type StopSignal = "SIGKILL" | "SIGTERM";

export interface CrashOptions {
  strokes?: number;
  clients?: number;
  /** Send the signal once this many stroke requests have been answered (default: half). */
  signalAfter?: number;
  log?: (line: string) => void;
}

export interface CrashRun {
  signal: StopSignal;
  strokes: number;
  clients: number;
  /** Phase 1, up to the signal and just after it. */
  acknowledged: number;
  /** Acknowledged with a 2xx status whose body the kill cut off. */
  acknowledgedBodyCutOff: number;
  refused: number;
  refusedStatuses: number[];
  noAnswer: number;
  /** Requests sent before the signal that never got an answer. */
  droppedInFlight: number;
  unsent: number;
  exit: { code: number | null; signal: string | null };
  /** Cluster state in global/pg_control once the server had exited. */
  controlStateAfterStop: string;
  stopLogLine: string | null;
  restartMs: number;
  controlStateAfterRestart: string;
  /** Read through the API after the restart, before anything was resent. */
  present: number;
  lost: number;
  duplicates: number;
  landedWithoutAnswer: number;
  strangers: number;
  /** Phase 2: every stroke without a success answer sent again. */
  resent: number;
  resentAccepted: number;
  resentAlreadyThere: number;
  resentFailed: number;
  /** Acknowledged strokes sent once more (every tenth), and how many were answered "already stored". */
  resentAcknowledged: number;
  resentAcknowledgedRecognised: number;
  finalPresent: number;
  finalDuplicates: number;
  /** Start, sign-ins and sessions; posting up to the signal; the resend. */
  setupMs: number;
  phase1Ms: number;
  phase2Ms: number;
  seconds: number;
  problems: string[];
}

type Outcome = "unsent" | "acked" | "refused" | "no-answer";

interface Phone {
  cookie: string;
  seatId: string;
  sessionId: string;
  strokes: StrokeInput[];
  outcome: Outcome[];
  sentAt: number[];
}

/** The cluster state in pg_control of the PGlite directory inside GRINDFADE_DATA_DIR (lib/env.ts). */
function clusterState(dataDir: string): string {
  return pgControlState(path.join(dataDir, "pglite"));
}

// ---- HTTP as a phone speaks it ------------------------------------------------------------------
function cookiesOf(res: Response): string[] {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]!);
}


async function getJson<T>(baseURL: string, cookie: string, route: string): Promise<T> {
  const res = await fetch(`${baseURL}${route}`, { headers: { cookie } });
  if (!res.ok) throw new Error(`GET ${route}: HTTP ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

async function postJson(
  baseURL: string,
  cookie: string,
  route: string,
  body: unknown,
): Promise<Response> {
  return fetch(`${baseURL}${route}`, {
    method: "POST",
    headers: { cookie, origin: baseURL, "content-type": "application/json" },
    body: JSON.stringify(body),
  });
}

/** Posts a phone's i-th stroke alone; the answer's body, or null when it did not arrive whole. */
async function sendStroke(baseURL: string, phone: Phone, i: number) {
  const res = await postJson(baseURL, phone.cookie, `/api/sessions/${phone.sessionId}/strokes`, { strokes: [phone.strokes[i]] });
  const body = (await res.json().catch(() => null)) as { accepted?: number; duplicates?: number } | null;
  return { res, body };
}

interface SeatApi {
  seat: { id: string; code: string; state: string };
  canWork: boolean;
  stages: { coarse: { strokes: Array<{ sessionId: string; clientId: string }> } };
}

/** Up to `wanted` seats of a job that the signed-in technician may work on and nobody has started. */
async function waitingSeats(
  baseURL: string,
  cookie: string,
  jobNumber: string,
  wanted: number,
): Promise<string[]> {
  const { jobs } = await getJson<{ jobs: Array<{ id: string; number: string }> }>(
    baseURL,
    cookie,
    "/api/jobs",
  );
  const job = jobs.find((j) => j.number === jobNumber);
  if (!job) throw new Error(`no job ${jobNumber}`);
  const page = await fetch(`${baseURL}/jobs/${job.id}`, { headers: { cookie } });
  const html = await page.text();
  const ids = [...new Set([...html.matchAll(/\/bench\/([0-9a-f-]{36})/g)].map((m) => m[1]!))];
  const seats: string[] = [];
  for (const id of ids) {
    if (seats.length >= wanted) break;
    const report = await getJson<SeatApi>(baseURL, cookie, `/api/seats/${id}`);
    if (report.canWork && report.seat.state === "waiting") seats.push(id);
  }
  return seats;
}

function strokesFor(count: number): StrokeInput[] {
  return Array.from({ length: count }, (_, k) => {
    const index = k + 1;
    // A fade from 12 dB towards 0.6 dB, as a seat lapping in.
    const contrastDb = Math.round((0.6 + 11.4 * Math.exp(-k / 25)) * 100) / 100;
    return syntheticStroke(index, contrastDb);
  });
}

/** How many times each of the phone's clientIds is stored, read through GET /api/seats/{id}. */
async function storedCounts(
  baseURL: string,
  phone: Phone,
): Promise<{ counts: Map<string, number>; strangers: number }> {
  const report = await getJson<SeatApi>(baseURL, phone.cookie, `/api/seats/${phone.seatId}`);
  const ours = new Set(phone.strokes.map((s) => s.clientId));
  const counts = new Map<string, number>();
  let strangers = 0;
  for (const s of report.stages.coarse.strokes) {
    if (s.sessionId !== phone.sessionId) continue;
    if (!ours.has(s.clientId)) strangers++;
    counts.set(s.clientId, (counts.get(s.clientId) ?? 0) + 1);
  }
  return { counts, strangers };
}

// ---- One run ----------------------------------------------------------------------------------
export async function crashRun(
  secret: string,
  signal: StopSignal,
  options: CrashOptions = {},
): Promise<CrashRun> {
  const total = options.strokes ?? 1000;
  const clientCount = options.clients ?? 10;
  const signalAfter = options.signalAfter ?? Math.floor(total / 2);
  const log = options.log ?? (() => {});
  const t0 = Date.now();
  const problems: string[] = [];
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-crash-"));
  const env = { GRINDFADE_MAIL_INTERVAL_MS: "60000" };
  let server: RunningServer | null = await startServer(secret, env, { dataDir });
  try {
    let baseURL = server.baseURL;
    log(`  ${signal} run: server healthy after ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    if (clusterState(dataDir) !== "in production")
      problems.push(`running server's cluster state is "${clusterState(dataDir)}"`);

    // Ten phones: half Ines on MHW-0141, half Dov on MHW-0142, each on a seat of its own.
    const technicians = DEMO_USERS.filter((u) => u.role === "technician");
    const jobOf: Record<string, string> = {
      "ines@millrace.example": "MHW-0141",
      "dov@millrace.example": "MHW-0142",
    };
    const free = new Map<string, string[]>();
    for (const [k, t] of technicians.entries()) {
      const cookie = await sessionCookie(baseURL, t.email, t.password);
      const wanted = Math.ceil((clientCount - k) / technicians.length);
      free.set(t.email, await waitingSeats(baseURL, cookie, jobOf[t.email]!, wanted));
    }
    log(`  seats found after ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    const perPhone = Math.ceil(total / clientCount);
    const phones: Phone[] = [];
    for (let c = 0; c < clientCount; c++) {
      const tech = technicians[c % technicians.length]!;
      const seatId = free.get(tech.email)!.shift();
      if (!seatId) throw new Error(`not enough waiting seats for ${tech.email}`);
      const cookie = await sessionCookie(baseURL, tech.email, tech.password);
      const sessionId = randomUUID();
      const res = await postJson(baseURL, cookie, `/api/seats/${seatId}/sessions`, {
        sessionId,
        stage: "coarse",
        deviceId: `crash-phone-${c}-${sessionId.slice(0, 8)}`,
        sampleRateHz: 48000,
        noiseFloorDb: -62,
      });
      if (res.status !== 201)
        throw new Error(`session on seat ${seatId}: HTTP ${res.status} ${await res.text()}`);
      const count = Math.min(perPhone, total - c * perPhone);
      const strokes = strokesFor(Math.max(0, count));
      phones.push({
        cookie,
        seatId,
        sessionId,
        strokes,
        outcome: strokes.map(() => "unsent"),
        sentAt: strokes.map(() => 0),
      });
    }

    const setupMs = Date.now() - t0;
    log(
      `  ${phones.length} phones signed in with a session each after ${(setupMs / 1000).toFixed(1)} s`,
    );

    // Phase 1: every phone posts its strokes in order; on the first failure it stops and keeps
    // the rest for later, as the outbox does. The signal goes out once `signalAfter` answers came.
    let answered = 0;
    let cutOff = 0;
    const refusedStatuses = new Set<number>();
    let signalAt = Infinity;
    const phase1Start = Date.now();
    let stopped: Promise<{ code: number | null; signal: string | null }> | null = null;
    const running = server;
    const sendSignal = () => {
      if (stopped) return;
      signalAt = Date.now();
      log(`  ${signal} after ${answered} answers`);
      stopped = running.kill(signal);
    };
    await Promise.all(
      phones.map(async (phone) => {
        for (let i = 0; i < phone.strokes.length; i++) {
          phone.sentAt[i] = Date.now();
          let outcome: Outcome;
          try {
            const { res, body } = await sendStroke(baseURL, phone, i);
            if (res.ok) {
              // A 2xx status is the success answer the outbox acts on, even when a kill cuts the
              // body off; a body that did arrive must say the stroke was new.
              outcome = "acked";
              if (body === null) cutOff++;
              else if (body.accepted !== 1 || body.duplicates !== 0) {
                problems.push(
                  `a first send was answered ${JSON.stringify(body)} instead of one accepted`,
                );
              }
            } else {
              outcome = "refused";
              refusedStatuses.add(res.status);
              if (Date.now() < signalAt)
                problems.push(`HTTP ${res.status} before the signal: ${JSON.stringify(body)}`);
              // A stopping server refuses new work with a 503 the outbox retries, never a 4xx.
              else if (res.status !== 503)
                problems.push(`HTTP ${res.status} while stopping: ${JSON.stringify(body)}`);
            }
          } catch {
            outcome = "no-answer";
          }
          phone.outcome[i] = outcome;
          answered++;
          if (answered >= signalAfter) sendSignal();
          if (outcome !== "acked") return;
        }
      }),
    );
    sendSignal();
    const phase1Ms = Date.now() - phase1Start;
    const exit = await stopped!;
    server = null;
    const output = running.output();
    // The server's log is JSON lines (pino); the stop line is the one whose message says so.
    const logMessages = output.split("\n").map((l) => {
      try {
        return String((JSON.parse(l) as { msg?: unknown }).msg ?? "");
      } catch {
        return l;
      }
    });
    const stopLogLine = logMessages.find((m) => m.startsWith("Grindfade stopped")) ?? null;
    const controlStateAfterStop = clusterState(dataDir);
    const all = phones.flatMap((p) => p.outcome.map((o, i) => ({ o, sentAt: p.sentAt[i]! })));
    const acknowledged = all.filter((x) => x.o === "acked").length;
    const refused = all.filter((x) => x.o === "refused").length;
    const noAnswer = all.filter((x) => x.o === "no-answer").length;
    const droppedInFlight = all.filter((x) => x.o === "no-answer" && x.sentAt < signalAt).length;
    const unsent = all.filter((x) => x.o === "unsent").length;
    log(`  stopped (${exit.signal ?? `exit ${exit.code}`}), pg_control: ${controlStateAfterStop}`);

    if (signal === "SIGKILL") {
      if (exit.signal !== "SIGKILL")
        problems.push(`the server did not die of SIGKILL (${JSON.stringify(exit)})`);
      if (controlStateAfterStop !== "in production") {
        problems.push(
          `after SIGKILL the cluster state is "${controlStateAfterStop}", not "in production"`,
        );
      }
    } else {
      if (exit.code !== 143)
        problems.push(`after SIGTERM the server exited with ${JSON.stringify(exit)}, not code 143`);
      if (controlStateAfterStop !== "shut down") {
        problems.push(
          `after SIGTERM the cluster state is "${controlStateAfterStop}", not "shut down"`,
        );
      }
      if (!stopLogLine?.includes("closed cleanly"))
        problems.push(`no clean-close line in the server log: ${stopLogLine}`);
    }
    if (acknowledged === 0 || unsent === 0)
      problems.push("the signal did not fall midway through the strokes");

    // Restart on the same directory: PGlite replays its write-ahead log after a kill.
    const restartStart = Date.now();
    server = await startServer(secret, env, { dataDir });
    const restartMs = Date.now() - restartStart;
    baseURL = server.baseURL;
    const controlStateAfterRestart = clusterState(dataDir);

    // Read back before anything is resent. The phones keep their sign-in across the restart.
    let present = 0;
    let lost = 0;
    let duplicates = 0;
    let landedWithoutAnswer = 0;
    let strangers = 0;
    for (const phone of phones) {
      const stored = await storedCounts(baseURL, phone);
      strangers += stored.strangers;
      phone.strokes.forEach((s, i) => {
        const n = stored.counts.get(s.clientId) ?? 0;
        if (n > 0) present++;
        if (n > 1) duplicates += n - 1;
        if (n === 0 && phone.outcome[i] === "acked") lost++;
        if (n > 0 && phone.outcome[i] !== "acked") landedWithoutAnswer++;
        if (n > 0 && phone.outcome[i] === "unsent")
          problems.push(`stroke ${s.clientId} is stored but was never sent`);
      });
    }

    // Phase 2: the outbox sends again every stroke that got no success answer, and a phone whose
    // page died between the answer and clearing its queue sends some acknowledged ones again:
    // every tenth acknowledged stroke here, each of which must be recognised as already stored.
    const phase2Start = Date.now();
    let resent = 0;
    let resentAccepted = 0;
    let resentAlreadyThere = 0;
    let resentFailed = 0;
    let resentAcknowledged = 0;
    let resentAcknowledgedRecognised = 0;
    await Promise.all(
      phones.map(async (phone) => {
        let ackedSeen = 0;
        for (let i = 0; i < phone.strokes.length; i++) {
          const acked = phone.outcome[i] === "acked";
          if (acked && ackedSeen++ % 10 !== 0) continue;
          const { res, body } = await sendStroke(baseURL, phone, i);
          if (acked) {
            resentAcknowledged++;
            if (res.ok && body?.accepted === 0 && body.duplicates === 1)
              resentAcknowledgedRecognised++;
            else
              problems.push(
                `an acknowledged stroke sent again was answered HTTP ${res.status} ${JSON.stringify(body)}`,
              );
            continue;
          }
          resent++;
          if (!res.ok) {
            resentFailed++;
            problems.push(`resend answered HTTP ${res.status}: ${JSON.stringify(body)}`);
            continue;
          }
          resentAccepted += body?.accepted ?? 0;
          resentAlreadyThere += body?.duplicates ?? 0;
        }
      }),
    );
    const phase2Ms = Date.now() - phase2Start;
    let finalPresent = 0;
    let finalDuplicates = 0;
    for (const phone of phones) {
      const { counts } = await storedCounts(baseURL, phone);
      for (const s of phone.strokes) {
        const n = counts.get(s.clientId) ?? 0;
        if (n > 0) finalPresent++;
        if (n > 1) finalDuplicates += n - 1;
      }
    }

    if (lost > 0) problems.push(`${lost} acknowledged stroke(s) lost`);
    if (duplicates > 0 || finalDuplicates > 0)
      problems.push(`${duplicates} / ${finalDuplicates} duplicate(s)`);
    if (strangers > 0) problems.push(`${strangers} stored stroke(s) that no phone sent`);
    if (controlStateAfterRestart !== "in production")
      problems.push(`restarted cluster state is "${controlStateAfterRestart}"`);
    if (resentAlreadyThere !== landedWithoutAnswer) {
      problems.push(
        `the resend found ${resentAlreadyThere} already stored, the read found ${landedWithoutAnswer}`,
      );
    }
    if (finalPresent !== total)
      problems.push(`after the resend ${finalPresent} of ${total} strokes are stored`);

    return {
      signal,
      strokes: total,
      clients: clientCount,
      acknowledged,
      acknowledgedBodyCutOff: cutOff,
      refused,
      refusedStatuses: [...refusedStatuses],
      noAnswer,
      droppedInFlight,
      unsent,
      exit,
      controlStateAfterStop,
      stopLogLine,
      restartMs,
      controlStateAfterRestart,
      present,
      lost,
      duplicates,
      landedWithoutAnswer,
      strangers,
      resent,
      resentAccepted,
      resentAlreadyThere,
      resentFailed,
      resentAcknowledged,
      resentAcknowledgedRecognised,
      finalPresent,
      finalDuplicates,
      setupMs,
      phase1Ms,
      phase2Ms,
      seconds: (Date.now() - t0) / 1000,
      problems,
    };
  } finally {
    if (server) await server.stop();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

export function describeRun(r: CrashRun): string[] {
  return [
    `${r.signal}: ${r.strokes} strokes from ${r.clients} phones, one per request`,
    `  before the signal: acknowledged ${r.acknowledged} (body cut off ${r.acknowledgedBodyCutOff}), refused ${r.refused}${r.refusedStatuses.length ? ` (HTTP ${r.refusedStatuses.join(", ")})` : ""}, no answer ${r.noAnswer} (sent before the signal ${r.droppedInFlight}), unsent ${r.unsent}`,
    `  stop: ${r.exit.signal ?? `exit code ${r.exit.code}`}; pg_control "${r.controlStateAfterStop}"${r.stopLogLine ? `; "${r.stopLogLine}"` : ""}`,
    `  restart: healthy in ${(r.restartMs / 1000).toFixed(1)} s; pg_control "${r.controlStateAfterRestart}"`,
    `  after restart: present ${r.present}, acknowledged present ${r.acknowledged - r.lost}/${r.acknowledged}, lost ${r.lost}, duplicates ${r.duplicates}, landed without an answer ${r.landedWithoutAnswer}`,
    `  resent ${r.resent}: accepted ${r.resentAccepted}, already stored ${r.resentAlreadyThere}, failed ${r.resentFailed}; acknowledged sent again ${r.resentAcknowledged}, recognised ${r.resentAcknowledgedRecognised}; finally present ${r.finalPresent}/${r.strokes}, duplicates ${r.finalDuplicates}`,
    `  time: ${r.seconds.toFixed(1)} s (start and sign-in ${(r.setupMs / 1000).toFixed(1)} s, posting ${(r.phase1Ms / 1000).toFixed(1)} s, resend ${(r.phase2Ms / 1000).toFixed(1)} s) — ${r.problems.length === 0 ? "PASS" : `FAIL: ${r.problems.join("; ")}`}`,
  ];
}

export async function runCrashSafety(options: CrashOptions = {}): Promise<CrashRun[]> {
  const secret = randomSecret();
  buildApp(secret, false);
  const runs: CrashRun[] = [];
  for (const signal of ["SIGKILL", "SIGTERM"] as const) {
    const run = await crashRun(secret, signal, options);
    for (const line of describeRun(run)) (options.log ?? console.log)(line);
    runs.push(run);
  }
  return runs;
}

async function main() {
  const runs = await runCrashSafety({ log: (line) => console.log(line) });
  process.exit(runs.every((r) => r.problems.length === 0) ? 0 : 1);
}

if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) {
  main().catch((err: unknown) => {
    console.error(err instanceof Error ? (err.stack ?? err.message) : String(err));
    process.exit(1);
  });
}
