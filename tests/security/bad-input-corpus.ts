// The bad-input corpus: malformed requests to every route handler that reads input, and malformed
// forms to the server actions. Each case names what is wrong with it, who sends it and the status
// it must get. Apart from that one fault each request is one the app would accept, so a missing
// check shows up as a success (and a changed database), not as a different refusal.
import { randomUUID } from "node:crypto";
import { NextRequest } from "next/server";
import * as auditRoute from "@/app/api/audit/route";
import * as auditCsvRoute from "@/app/api/audit/csv/route";
import * as sheetsRoute from "@/app/api/heads/[headId]/sheets/route";
import * as jobsRoute from "@/app/api/jobs/route";
import * as photoRoute from "@/app/api/photos/[photoId]/route";
import * as seatPhotosRoute from "@/app/api/seats/[seatId]/photos/route";
import * as seatRoute from "@/app/api/seats/[seatId]/route";
import * as seatChecksRoute from "@/app/api/seats/[seatId]/checks/route";
import * as sessionsRoute from "@/app/api/seats/[seatId]/sessions/route";
import * as endRoute from "@/app/api/sessions/[sessionId]/end/route";
import * as chunksRoute from "@/app/api/sessions/[sessionId]/recording/chunks/route";
import * as recordingRoute from "@/app/api/sessions/[sessionId]/recording/route";
import * as strokesRoute from "@/app/api/sessions/[sessionId]/strokes/route";
import * as customerActions from "@/lib/actions/customers";
import * as doneCheckActions from "@/lib/actions/done-checks";
import * as jobActions from "@/lib/actions/jobs";
import * as mailActions from "@/lib/actions/mail";
import * as reviewActions from "@/lib/actions/review";
import * as shopActions from "@/lib/actions/shop";
import * as sheetActions from "@/lib/actions/sheets";
import * as specActions from "@/lib/actions/specs";
import { initialActionState, type ActionState } from "@/lib/actions/state";
import * as userActions from "@/lib/actions/users";
import { authOptions } from "@/lib/auth/options";
import { heicHead, jpegHead, wavFile } from "../storage/fixtures";
import { ADMIN, DOV, INES, QUILL, RHEA, type Fixtures } from "./bad-input-fixtures";
import { signInErrorMessage } from "@/lib/auth/sign-in-errors";

export const BASE_URL = "http://grindfade.test";
const MB = 1024 * 1024;

export interface RouteCase {
  group: string;
  /** What is wrong with the request. */
  name: string;
  /** Who is signed in (an e-mail), or null for nobody. */
  as: string | null;
  status: number;
  /** The message must match, when given; otherwise any sentence will do. */
  message?: RegExp;
  send(f: Fixtures): Promise<Response>;
}

export interface ActionCase {
  group: string;
  name: string;
  as: string | null;
  message?: RegExp;
  /** A field the failure must name, when the fault is in one field. */
  field?: string;
  run(f: Fixtures): Promise<ActionState>;
}

// ------------------------------------------------------------------ request building

type Body = string | Uint8Array | ReadableStream<Uint8Array> | FormData | null;

function request(path: string, method: string, body: Body = null, headers: Record<string, string> = {}): NextRequest {
  const init: RequestInit & { duplex?: "half" } = { method, headers };
  if (body !== null) {
    init.body = body instanceof Uint8Array ? Buffer.from(body) : body;
    if (body instanceof ReadableStream) init.duplex = "half";
  }
  return new NextRequest(`${BASE_URL}${path}`, init as ConstructorParameters<typeof NextRequest>[1]);
}

const JSON_TYPE = { "content-type": "application/json" };
const params = <T>(p: T) => ({ params: Promise.resolve(p) });

/** `head` followed by zero bytes up to `total`, made a megabyte at a time as it is read. */
function stream(head: Uint8Array, total: number): ReadableStream<Uint8Array> {
  let sent = 0;
  return new ReadableStream<Uint8Array>({
    pull(c) {
      if (sent >= total) return c.close();
      const n = Math.min(MB, total - sent);
      const chunk = new Uint8Array(n);
      if (sent === 0) chunk.set(head.subarray(0, n));
      sent += n;
      c.enqueue(chunk);
    },
  });
}

/** A browser's form upload of `bytes` under the given file name. */
function multipart(bytes: Uint8Array, filename: string, type: string): FormData {
  const f = new FormData();
  f.set("file", new File([Buffer.from(bytes)], filename, { type }));
  return f;
}

const startBody = (o: Record<string, unknown> = {}) => ({
  sessionId: randomUUID(),
  stage: "coarse",
  deviceId: "phone-bad-input-1",
  sampleRateHz: 48000,
  noiseFloorDb: -62,
  ...o,
});

const stroke = (o: Record<string, unknown> = {}) => ({
  clientId: randomUUID(),
  index: 1,
  startS: 2,
  endS: 3.4,
  onsetDb: -22,
  bodyDb: -30,
  contrastDb: 8,
  flags: [],
  ...o,
});

/** A stroke batch's JSON with one raw value spliced in, for what JSON.stringify cannot write. */
const rawStroke = (field: string, raw: string) =>
  JSON.stringify({ strokes: [stroke({ [field]: "@RAW@" })] }).replace('"@RAW@"', raw);

const startSession = (seatId: string, body: unknown, headers: Record<string, string> = JSON_TYPE) =>
  sessionsRoute.POST(
    request(`/api/seats/${seatId}/sessions`, "POST", typeof body === "string" || body instanceof Uint8Array || body instanceof ReadableStream || body instanceof FormData ? body : JSON.stringify(body), headers),
    params({ seatId }),
  );

const postStrokes = (sessionId: string, body: unknown, headers: Record<string, string> = JSON_TYPE) =>
  strokesRoute.POST(
    request(`/api/sessions/${sessionId}/strokes`, "POST", typeof body === "string" || body instanceof ReadableStream ? body : JSON.stringify(body), headers),
    params({ sessionId }),
  );

const endSession = (sessionId: string) => endRoute.POST(request(`/api/sessions/${sessionId}/end`, "POST"), params({ sessionId }));

const putRecording = (sessionId: string, body: Body, headers: Record<string, string> = { "content-type": "audio/wav" }) =>
  recordingRoute.PUT(request(`/api/sessions/${sessionId}/recording`, "PUT", body, headers), params({ sessionId }));

const getRecording = (sessionId: string, headers: Record<string, string> = {}) =>
  recordingRoute.GET(request(`/api/sessions/${sessionId}/recording`, "GET", null, headers), params({ sessionId }));

const putChunk = (sessionId: string, body: Body, headers: Record<string, string>) =>
  chunksRoute.PUT(
    request(`/api/sessions/${sessionId}/recording/chunks`, "PUT", body, { "content-type": "application/octet-stream", ...headers }),
    params({ sessionId }),
  );

const postPhoto = (seatId: string, body: Body, headers: Record<string, string> = { "content-type": "image/jpeg" }) =>
  seatPhotosRoute.POST(request(`/api/seats/${seatId}/photos`, "POST", body, headers), params({ seatId }));

const getAudit = (query: string) => auditRoute.GET(request(`/api/audit?${query}`, "GET"), params({}));
const getAuditCsv = (query: string) => auditCsvRoute.GET(request(`/api/audit/csv?${query}`, "GET"), params({}));

/** Ids that try to climb out of their path segment or smuggle something in. */
const TRAVERSAL_ID = "..%2F..%2Fetc%2Fpasswd";
const NUL_ID = "00000000-0000-4000-8000-00000000000\u0000";
const HUGE = (n: number) => "x".repeat(n);
const NUL_TEXT = "Lapped \u0000 and checked";

// ------------------------------------------------------------------ route handlers

export const routeCases: RouteCase[] = [
  // POST /api/seats/[seatId]/sessions
  ...(
    [
      ["invalid JSON", '{"sessionId": "', 400, /must be JSON/],
      ["a NaN literal (not JSON)", JSON.stringify(startBody({ sampleRateHz: "@" })).replace('"@"', "NaN"), 400, /must be JSON/],
      ["an Infinity literal (not JSON)", JSON.stringify(startBody({ noiseFloorDb: "@" })).replace('"@"', "-Infinity"), 400, /must be JSON/],
      ["1e309 (parses to Infinity)", JSON.stringify(startBody({ sampleRateHz: "@" })).replace('"@"', "1e309"), 400, /^sampleRateHz: /],
      ['"NaN" as a string', startBody({ noiseFloorDb: "NaN" }), 400, /^noiseFloorDb: /],
      ["a negative sample rate", startBody({ sampleRateHz: -48000 }), 400, /^sampleRateHz: /],
      ["a fractional sample rate", startBody({ sampleRateHz: 44100.5 }), 400, /^sampleRateHz: /],
      ["an unknown stage", startBody({ stage: "polish" }), 400, /^stage: Stage must be coarse or fine/],
      ["a stage of the wrong type", startBody({ stage: 1 }), 400, /^stage: /],
      ["a deviceId that is an object", startBody({ deviceId: { id: "phone" } }), 400, /^deviceId: /],
      ["a body that is an array", [startBody()], 400, /./],
      ["a body that is null", null, 400, /./],
      ["a 100 kB deviceId", startBody({ deviceId: HUGE(100_000) }), 400, /^deviceId: /],
      ["a NUL byte in the deviceId", startBody({ deviceId: "phone-\u0000-ines" }), 400, /^deviceId: /],
      ["a sessionId that climbs paths", startBody({ sessionId: "../../etc/passwd" }), 400, /^sessionId: /],
    ] as const
  ).map(
    ([name, body, status, message]): RouteCase => ({
      group: "session start",
      name,
      as: INES,
      status,
      message,
      send: (f) => startSession(f.own.seats.get("3I1")!, body),
    }),
  ),
  {
    group: "session start",
    name: "valid JSON sent as text/plain",
    as: INES,
    status: 415,
    message: /application\/json/,
    send: (f) => startSession(f.own.seats.get("3I1")!, JSON.stringify(startBody()), { "content-type": "text/plain" }),
  },
  {
    group: "session start",
    name: "a multipart form where JSON is expected",
    as: INES,
    status: 415,
    message: /application\/json/,
    send: (f) => {
      const form = new FormData();
      for (const [k, v] of Object.entries(startBody())) form.set(k, String(v));
      return startSession(f.own.seats.get("3I1")!, form, {});
    },
  },
  {
    group: "session start",
    name: "JSON with no content type at all",
    as: INES,
    status: 415,
    send: (f) => startSession(f.own.seats.get("3I1")!, new TextEncoder().encode(JSON.stringify(startBody())), {}),
  },
  {
    group: "session start",
    name: "a 2 MB JSON body",
    as: INES,
    status: 413,
    message: /larger than 1 MB/,
    send: (f) => startSession(f.own.seats.get("3I1")!, startBody({ deviceId: HUGE(2 * MB) })),
  },
  {
    group: "session start",
    name: "a JSON body declaring 50 MB",
    as: INES,
    status: 413,
    send: (f) => startSession(f.own.seats.get("3I1")!, JSON.stringify(startBody()), { ...JSON_TYPE, "content-length": String(50 * MB) }),
  },
  {
    group: "session start",
    name: "an endless JSON body with no declared length",
    as: INES,
    status: 413,
    send: (f) => startSession(f.own.seats.get("3I1")!, stream(new TextEncoder().encode('{"deviceId":"'), 8 * MB)),
  },
  { group: "session start", name: "a seat id that climbs paths", as: INES, status: 400, send: () => startSession(TRAVERSAL_ID, startBody()) },
  { group: "session start", name: "a seat id with a NUL byte", as: INES, status: 400, send: () => startSession(NUL_ID, startBody()) },
  { group: "session start", name: "another shop's seat", as: INES, status: 404, message: /your shop/, send: (f) => startSession(f.other.seats.get("2I1")!, startBody()) },
  { group: "session start", name: "a seat that does not exist", as: INES, status: 404, send: () => startSession(randomUUID(), startBody()) },
  { group: "session start", name: "nobody signed in", as: null, status: 401, send: (f) => startSession(f.own.seats.get("3I1")!, startBody()) },
  { group: "session start", name: "a technician on another's job", as: DOV, status: 403, send: (f) => startSession(f.own.seats.get("3I1")!, startBody()) },
  { group: "session start", name: "an admin", as: ADMIN, status: 403, send: (f) => startSession(f.own.seats.get("3I1")!, startBody()) },
  {
    group: "session start",
    name: "resuming another technician's session from another phone",
    as: DOV,
    status: 403,
    message: /started by/,
    send: (f) => startSession(f.openJob.seats.get("2I1")!, startBody({ sessionId: f.openJob.inesSession, deviceId: "phone-dov-1" })),
  },
  {
    group: "session start",
    name: "the id of another shop's session",
    as: INES,
    status: 409,
    send: (f) => startSession(f.own.seats.get("3I1")!, startBody({ sessionId: f.other.sessionId })),
  },

  // POST /api/sessions/[sessionId]/strokes
  ...(
    [
      ["invalid JSON", '{"strokes": [', 400, /must be JSON/],
      ["strokes that are a string", { strokes: "many" }, 400, /^strokes: /],
      ["a negative index", { strokes: [stroke({ index: -1 })] }, 400, /^strokes\.0\.index: /],
      ["a fractional index", { strokes: [stroke({ index: 1.5 })] }, 400, /^strokes\.0\.index: /],
      ['"NaN" as a contrast', { strokes: [stroke({ contrastDb: "NaN" })] }, 400, /^strokes\.0\.contrastDb: /],
      ['"Infinity" as a start', { strokes: [stroke({ startS: "Infinity" })] }, 400, /^strokes\.0\.startS: /],
      ["1e309 as a contrast (parses to Infinity)", rawStroke("contrastDb", "1e309"), 400, /^strokes\.0\.contrastDb: /],
      ["-1e309 as a level", rawStroke("onsetDb", "-1e309"), 400, /^strokes\.0\.onsetDb: /],
      ["a NaN literal (not JSON)", rawStroke("startS", "NaN"), 400, /must be JSON/],
      ["a negative start", { strokes: [stroke({ startS: -2, endS: 1 })] }, 400, /^strokes\.0\.startS: /],
      ["an end before its start", { strokes: [stroke({ startS: 5, endS: 4 })] }, 400, /^strokes\.0\.endS: /],
      ["an unknown flag", { strokes: [stroke({ flags: ["drill-spun"] })] }, 400, /^strokes\.0\.flags\.0: /],
      ["501 strokes in one batch", { strokes: Array.from({ length: 501 }, (_, i) => stroke({ index: i + 1, startS: 2 * i + 2, endS: 2 * i + 3 })) }, 400, /at most 500/],
      ["a clientId that climbs paths", { strokes: [stroke({ clientId: "../../etc/passwd" })] }, 400, /^strokes\.0\.clientId: /],
      ["a 100 kB clientId", { strokes: [stroke({ clientId: HUGE(100_000) })] }, 400, /^strokes\.0\.clientId: /],
      // Single precision (the real columns): times a nanosecond apart are one time as stored.
      ["an end a nanosecond after its start", { strokes: [stroke({ startS: 1, endS: 1 + 1e-9 })] }, 400, /^strokes\.0\.endS: /],
      ["an end one double after its start near a day", { strokes: [stroke({ startS: 86_399.99, endS: 86_399.995 })] }, 400, /^strokes\.0\.endS: /],
      ["an end past a day as stored", { strokes: [stroke({ startS: 1, endS: 86_400.01 })] }, 400, /^strokes\.0\.endS: /],
      ["a contrast past 60 dB by 1e-5", { strokes: [stroke({ contrastDb: 60.00001 })] }, 400, /^strokes\.0\.contrastDb: /],
      ["a level past single precision's range", rawStroke("bodyDb", "1e39"), 400, /^strokes\.0\.bodyDb: /],
    ] as const
  ).map(
    ([name, body, status, message]): RouteCase => ({
      group: "strokes",
      name,
      as: INES,
      status,
      message,
      send: (f) => postStrokes(f.inesSession, body),
    }),
  ),
  {
    group: "strokes",
    name: "valid strokes sent as text/plain",
    as: INES,
    status: 415,
    send: (f) => postStrokes(f.inesSession, JSON.stringify({ strokes: [stroke()] }), { "content-type": "text/plain;charset=UTF-8" }),
  },
  {
    group: "strokes",
    name: "valid strokes as a urlencoded form",
    as: INES,
    status: 415,
    send: (f) => postStrokes(f.inesSession, `strokes=${encodeURIComponent(JSON.stringify([stroke()]))}`, { "content-type": "application/x-www-form-urlencoded" }),
  },
  {
    group: "strokes",
    name: "a 1.2 MB batch",
    as: INES,
    status: 413,
    send: (f) => postStrokes(f.inesSession, JSON.stringify({ strokes: [stroke({ padding: HUGE(1.2 * MB) })] })),
  },
  { group: "strokes", name: "another shop's session", as: INES, status: 404, send: (f) => postStrokes(f.other.sessionId, { strokes: [stroke()] }) },
  { group: "strokes", name: "a session started by another technician", as: DOV, status: 403, send: (f) => postStrokes(f.inesSession, { strokes: [stroke()] }) },
  {
    group: "strokes",
    name: "another technician's session on a job assigned to nobody",
    as: DOV,
    status: 403,
    message: /started by/,
    send: (f) => postStrokes(f.openJob.inesSession, { strokes: [stroke()] }),
  },
  { group: "strokes", name: "a session id that climbs paths", as: INES, status: 400, send: () => postStrokes(TRAVERSAL_ID, { strokes: [stroke()] }) },
  { group: "strokes", name: "a session that does not exist", as: INES, status: 404, send: () => postStrokes(randomUUID(), { strokes: [stroke()] }) },

  // POST /api/sessions/[sessionId]/end
  { group: "session end", name: "another shop's session", as: INES, status: 404, send: (f) => endSession(f.other.sessionId) },
  { group: "session end", name: "a session started by another technician", as: DOV, status: 403, send: (f) => endSession(f.inesSession) },
  { group: "session end", name: "another technician's session on a job assigned to nobody", as: DOV, status: 403, send: (f) => endSession(f.openJob.inesSession) },
  { group: "session end", name: "a session id with a NUL byte", as: INES, status: 400, send: () => endSession(NUL_ID) },
  { group: "session end", name: "nobody signed in", as: null, status: 401, send: (f) => endSession(f.inesSession) },

  // PUT /api/sessions/[sessionId]/recording
  { group: "recording upload", name: "text that is not audio", as: INES, status: 415, send: (f) => putRecording(f.inesSession, new TextEncoder().encode("not a recording at all"), { "content-type": "text/plain" }) },
  {
    group: "recording upload",
    name: "a multipart upload named ../../etc/passwd",
    as: INES,
    status: 415,
    send: (f) => putRecording(f.inesSession, multipart(wavFile, "../../etc/passwd", "audio/wav"), {}),
  },
  {
    group: "recording upload",
    name: "JSON where audio is expected",
    as: INES,
    status: 415,
    send: (f) => putRecording(f.inesSession, JSON.stringify({ file: "../../etc/passwd" }), JSON_TYPE),
  },
  {
    group: "recording upload",
    name: "a declared length over 64 MB",
    as: INES,
    status: 413,
    message: /64 MB/,
    send: (f) => putRecording(f.inesSession, wavFile, { "content-type": "audio/wav", "content-length": String(64 * MB + 1) }),
  },
  {
    group: "recording upload",
    name: "65 MB of WAV streamed with no declared length",
    as: INES,
    status: 413,
    message: /64 MB/,
    send: (f) => putRecording(f.inesSession, stream(wavFile, 65 * MB)),
  },
  { group: "recording upload", name: "an empty body", as: INES, status: 400, send: (f) => putRecording(f.inesSession, new Uint8Array(0)) },
  { group: "recording upload", name: "another shop's session", as: INES, status: 404, send: (f) => putRecording(f.other.sessionId, wavFile) },
  { group: "recording upload", name: "a session started by another technician", as: DOV, status: 403, send: (f) => putRecording(f.inesSession, wavFile) },
  { group: "recording upload", name: "another technician's session on a job assigned to nobody", as: DOV, status: 403, send: (f) => putRecording(f.openJob.inesSession, wavFile) },
  { group: "recording upload", name: "a session id that climbs paths", as: INES, status: 400, send: () => putRecording("../../../etc/passwd", wavFile) },

  // GET /api/sessions/[sessionId]/recording
  { group: "recording playback", name: "another shop's session", as: RHEA, status: 404, send: (f) => getRecording(f.other.sessionId) },
  { group: "recording playback", name: "a session id that climbs paths", as: RHEA, status: 400, send: () => getRecording(TRAVERSAL_ID) },
  { group: "recording playback", name: "a range starting beyond the end", as: RHEA, status: 416, send: (f) => getRecording(f.inesSession, { range: "bytes=99999999999999999999-" }) },

  // /api/sessions/[sessionId]/recording/chunks
  { group: "chunked upload", name: "a chunk with no Content-Range", as: INES, status: 400, message: /Content-Range/, send: (f) => putChunk(f.inesSession, wavFile, {}) },
  { group: "chunked upload", name: "a total over 64 MB", as: INES, status: 413, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": `bytes 0-${wavFile.length - 1}/${65 * MB}` }) },
  { group: "chunked upload", name: "an end before the start", as: INES, status: 400, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": "bytes 100-10/2000" }) },
  { group: "chunked upload", name: "NaN in the range", as: INES, status: 400, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": "bytes NaN-10/2000" }) },
  { group: "chunked upload", name: "a negative start", as: INES, status: 400, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": "bytes -5-10/2000" }) },
  {
    group: "chunked upload",
    name: "a declared length that differs from the range",
    as: INES,
    status: 400,
    send: (f) => putChunk(f.inesSession, wavFile, { "content-range": `bytes 0-${wavFile.length - 1}/${wavFile.length}`, "content-length": "12" }),
  },
  {
    group: "chunked upload",
    name: "a first chunk that is not audio",
    as: INES,
    status: 415,
    send: (f) => putChunk(f.inesSession, new TextEncoder().encode("x".repeat(600)), { "content-range": "bytes 0-599/600" }),
  },
  { group: "chunked upload", name: "a chunk leaving a gap", as: INES, status: 409, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": `bytes 100-${99 + wavFile.length}/${200 + wavFile.length}` }) },
  {
    group: "chunked upload",
    name: "another technician's session on a job assigned to nobody",
    as: DOV,
    status: 403,
    send: (f) => putChunk(f.openJob.inesSession, wavFile, { "content-range": `bytes 0-${wavFile.length - 1}/${wavFile.length}` }),
  },
  { group: "chunked upload", name: "a session started by another technician", as: DOV, status: 403, send: (f) => putChunk(f.inesSession, wavFile, { "content-range": `bytes 0-${wavFile.length - 1}/${wavFile.length}` }) },
  {
    group: "chunked upload",
    name: "progress of another shop's session",
    as: INES,
    status: 404,
    send: (f) => chunksRoute.GET(request(`/api/sessions/${f.other.sessionId}/recording/chunks`, "GET"), params({ sessionId: f.other.sessionId })),
  },
  {
    group: "chunked upload",
    name: "HEAD with an id that climbs paths",
    as: INES,
    status: 400,
    send: () => chunksRoute.HEAD(request(`/api/sessions/x/recording/chunks`, "HEAD"), params({ sessionId: TRAVERSAL_ID })),
  },

  // POST /api/seats/[seatId]/photos
  // Kept whole or refused: what arrived against what was declared.
  { group: "photo upload", name: "a body shorter than its Content-Length", as: INES, status: 400, message: /bytes; nothing was kept/, send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead, { "content-type": "image/jpeg", "content-length": String(jpegHead.length + 500) }) },
  { group: "photo upload", name: "a Content-Digest that does not match", as: INES, status: 400, message: /SHA-256/, send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead, { "content-type": "image/jpeg", "content-digest": `sha-256=:${"A".repeat(43)}=:` }) },
  { group: "photo upload", name: "a Content-Digest of another algorithm", as: INES, status: 400, send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead, { "content-type": "image/jpeg", "content-digest": "md5=:AAAA:" }) },
  { group: "recording upload", name: "a recording shorter than its Content-Length", as: INES, status: 400, message: /bytes; nothing was kept/, send: (f) => putRecording(f.inesSession, wavFile, { "content-type": "audio/wav", "content-length": String(wavFile.length + 1000) }) },
  { group: "recording upload", name: "a Content-Length that is no number", as: INES, status: 400, send: (f) => putRecording(f.inesSession, wavFile, { "content-type": "audio/wav", "content-length": "12abc" }) },
  { group: "photo upload", name: "text that is not an image", as: INES, status: 415, send: (f) => postPhoto(f.own.seats.get("3I1")!, new TextEncoder().encode("<svg onload=alert(1)>"), { "content-type": "image/jpeg" }) },
  {
    group: "photo upload",
    name: "a multipart upload named ../../etc/passwd",
    as: INES,
    status: 415,
    send: (f) => postPhoto(f.own.seats.get("3I1")!, multipart(jpegHead, "../../etc/passwd", "image/jpeg"), {}),
  },
  {
    group: "photo upload",
    name: "a multipart upload named with a NUL byte",
    as: INES,
    status: 415,
    send: (f) => postPhoto(f.own.seats.get("3I1")!, multipart(jpegHead, "ring.jpg\u0000.sh", "image/jpeg"), {}),
  },
  { group: "photo upload", name: "JSON where an image is expected", as: INES, status: 415, send: (f) => postPhoto(f.own.seats.get("3I1")!, JSON.stringify({ name: "../../ring.jpg" }), JSON_TYPE) },
  { group: "photo upload", name: "a HEIC photo", as: INES, status: 415, message: /HEIC/, send: (f) => postPhoto(f.own.seats.get("3I1")!, heicHead, { "content-type": "image/heic" }) },
  {
    group: "photo upload",
    name: "a declared length over 10 MB",
    as: INES,
    status: 413,
    message: /10 MB/,
    send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead, { "content-type": "image/jpeg", "content-length": String(10 * MB + 1) }),
  },
  { group: "photo upload", name: "11 MB of JPEG streamed with no declared length", as: INES, status: 413, message: /10 MB/, send: (f) => postPhoto(f.own.seats.get("3I1")!, stream(jpegHead, 11 * MB)) },
  { group: "photo upload", name: "an empty body", as: INES, status: 400, send: (f) => postPhoto(f.own.seats.get("3I1")!, new Uint8Array(0)) },
  { group: "photo upload", name: "another shop's seat", as: INES, status: 404, send: (f) => postPhoto(f.other.seats.get("1I1")!, jpegHead) },
  { group: "photo upload", name: "a seat id that climbs paths", as: INES, status: 400, send: () => postPhoto("../../../../tmp/x", jpegHead) },
  { group: "photo upload", name: "a technician on another's job", as: DOV, status: 403, send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead) },
  { group: "photo upload", name: "nobody signed in", as: null, status: 401, send: (f) => postPhoto(f.own.seats.get("3I1")!, jpegHead) },

  // GET /api/photos/[photoId], GET /api/seats/[seatId]/photos
  { group: "photo reads", name: "another shop's photo", as: RHEA, status: 404, send: (f) => photoRoute.GET(request(`/api/photos/${f.other.photoId}`, "GET"), params({ photoId: f.other.photoId })) },
  { group: "photo reads", name: "a photo id that climbs paths", as: RHEA, status: 400, send: () => photoRoute.GET(request("/api/photos/x", "GET"), params({ photoId: "../../blobs/photos" })) },
  { group: "photo reads", name: "a photo id with a NUL byte", as: RHEA, status: 400, send: () => photoRoute.GET(request("/api/photos/x", "GET"), params({ photoId: NUL_ID })) },
  { group: "photo reads", name: "the photo list of another shop's seat", as: RHEA, status: 404, send: (f) => seatPhotosRoute.GET(request("/api/seats/x/photos", "GET"), params({ seatId: f.other.seats.get("1I1")! })) },

  // GET /api/seats/[seatId]/checks
  { group: "done-check reads", name: "another shop's seat", as: RHEA, status: 404, send: (f) => seatChecksRoute.GET(request("/api/seats/x/checks", "GET"), params({ seatId: f.other.seats.get("1I1")! })) },
  { group: "done-check reads", name: "a seat id that climbs paths", as: RHEA, status: 400, send: () => seatChecksRoute.GET(request("/api/seats/x/checks", "GET"), params({ seatId: "../../etc/passwd" })) },
  { group: "done-check reads", name: "a seat id with a NUL byte", as: INES, status: 400, send: () => seatChecksRoute.GET(request("/api/seats/x/checks", "GET"), params({ seatId: NUL_ID })) },
  { group: "done-check reads", name: "nobody signed in", as: null, status: 401, send: (f) => seatChecksRoute.GET(request("/api/seats/x/checks", "GET"), params({ seatId: f.own.seats.get("3I1")! })) },

  // GET /api/seats/[seatId], GET /api/heads/[headId]/sheets, GET /api/jobs
  { group: "reads", name: "another shop's seat", as: INES, status: 404, send: (f) => seatRoute.GET(request("/api/seats/x", "GET"), params({ seatId: f.other.seats.get("1I1")! })) },
  { group: "reads", name: "a seat id of 100 kB", as: INES, status: 400, send: () => seatRoute.GET(request("/api/seats/x", "GET"), params({ seatId: HUGE(100_000) })) },
  { group: "reads", name: "another shop's head sheets", as: RHEA, status: 404, send: (f) => sheetsRoute.GET(request("/api/heads/x/sheets", "GET"), params({ headId: f.other.headId })) },
  { group: "reads", name: "a head id that climbs paths", as: RHEA, status: 400, send: () => sheetsRoute.GET(request("/api/heads/x/sheets", "GET"), params({ headId: "../../../etc/passwd" })) },
  { group: "reads", name: "the job list with nobody signed in", as: null, status: 401, send: () => jobsRoute.GET(request("/api/jobs", "GET"), params({})) },

  // GET /api/audit
  ...(
    [
      ["before=NaN", "before=NaN"],
      ["before=Infinity", "before=Infinity"],
      ["before=1e309", "before=1e309"],
      ["a negative cursor", "before=-1"],
      ["a fractional cursor", "before=1.5"],
      ["a cursor past what a bigint holds", "before=99999999999999999999"],
      ["a job id that climbs paths", `job=${TRAVERSAL_ID}`],
      ["a person id that is SQL", "person=' or 1=1 --"],
      ["a date that is no date", "from=yesterday"],
      ["a month that does not exist", "from=2026-13-45"],
      ["a start after the end", "from=2026-03-14&to=2026-03-01"],
      // Timestamps: the day after 9999-12-31 has no text PostgreSQL reads; year 0 does not exist.
      ["the last day of year 9999", "to=9999-12-31"],
      ["a start in year 9999", "from=9999-06-01"],
      ["year 0", "from=0000-01-01"],
      ["year 1", "from=0001-01-01"],
    ] as const
  ).map(([name, query]): RouteCase => ({ group: "audit trail", name, as: RHEA, status: 400, send: () => getAudit(query) })),
  { group: "audit trail", name: "a technician", as: INES, status: 403, send: () => getAudit("before=1") },

  // GET /api/audit/csv: the same filters, every page at once.
  ...(
    [
      ["a date that is no date", "from=yesterday", /^The audit trail's filters are not valid: Use a date like 2026-03-14\.$/],
      ["a day not on the calendar", "to=2026-02-31", /^The audit trail's filters are not valid: That day is not on the calendar\.$/],
      ["a day outside the years taken", "to=9999-12-31", /^The audit trail's filters are not valid: Use a date between 1900 and 9998\.$/],
      ["a start after the end", "from=2026-03-14&to=2026-03-01", /start date is after the end date/],
      ["a job number where the job's id goes", "job=MHW-0141", /^The audit trail's filters are not valid: That is not a job of this shop: choose one from the list\.$/],
      ["a job id that climbs paths", `job=${TRAVERSAL_ID}`, /not a job of this shop/],
      ["a person id with a NUL", `person=${encodeURIComponent(NUL_ID)}`, /not a person of this shop/],
    ] as const
  ).map(([name, query, message]): RouteCase => ({ group: "audit export", name, as: RHEA, status: 400, message, send: () => getAuditCsv(query) })),
  { group: "audit export", name: "a technician", as: INES, status: 403, send: () => getAuditCsv("") },
  { group: "audit export", name: "nobody signed in", as: null, status: 401, send: () => getAuditCsv("") },
];

// ------------------------------------------------------------------ server actions

const form = (o: Record<string, string>): FormData => {
  const f = new FormData();
  for (const [k, v] of Object.entries(o)) f.set(k, v);
  return f;
};

const jobForm = (o: Record<string, unknown> = {}) => ({
  customerId: "",
  newCustomerName: "Larchfield Taxis",
  engineDescription: "Varda VX18 1.8 inline-4, twin cam, 16 valves",
  engineSpecId: "",
  promisedOn: "2026-12-24",
  assignedTechnicianId: "",
  notes: "",
  headLabel: "Cylinder head",
  arrangement: "inline",
  cylinderCount: "4",
  intakeValvesPerCylinder: "2",
  exhaustValvesPerCylinder: "2",
  camshaftCount: "2",
  journalsPerCamshaft: "5",
  ...o,
});

const createJob = (o: Record<string, unknown>) => jobActions.createJob(jobForm(o));

const customerForm = (o: Record<string, string> = {}) =>
  form({ name: "Larchfield Taxis", contactName: "Mo Haskett", email: "office@larchfield.example", phone: "01632 960 222", address: "2 Yard Lane, Lockbridge", ...o });
const createCustomer = (o: Record<string, string>) => customerActions.createCustomer(initialActionState, customerForm(o));
const shopSettings = (o: Record<string, string>) =>
  shopActions.updateShopSettings(initialActionState, form({ name: "Millrace Head Works", address: "Unit 4, Weir Yard, Lockbridge", phone: "01632 960 414", timeZone: "Europe/London", ...o }));

const clearance = (f: Fixtures, o: Record<string, string>) =>
  sheetActions.saveClearanceReading(
    initialActionState,
    form({ jobId: f.own.jobId, journalId: f.own.journalId, method: "strip", stripId: "narrow", value: "0.051", unit: "mm", ...o }),
  );

const torque = (f: Fixtures, o: Record<string, string>) =>
  sheetActions.saveTorqueSetup(
    initialActionState,
    form({ jobId: f.own.jobId, camshaftId: f.own.camshaftId, capCount: "5", boltsPerCap: "2", orderMode: "centre-out", finalTorque: "10", finalTorqueUnit: "N·m", stageFractions: "0.5, 1", ...o }),
  );

const measurement = (f: Fixtures, o: Record<string, string>) =>
  sheetActions.saveMeasurement(
    initialActionState,
    form({ jobId: f.own.jobId, kind: "seat_contact_width", seatId: f.own.seats.get("3I1")!, value: "1.3", unit: "mm", specMin: "", specMax: "", ...o }),
  );

const seatRow = (f: Fixtures, o: Record<string, string>) =>
  sheetActions.saveSeatMeasurements(initialActionState, form({ jobId: f.own.jobId, seatId: f.own.seats.get("3I1")!, seat_contact_width: "1.3", ...o }));

const valveIdentity = (f: Fixtures, o: Record<string, string>) =>
  sheetActions.saveValveIdentity(initialActionState, form({ jobId: f.own.jobId, valveId: f.own.valveIn.get("3I1")!, tag: "3I1", partNumber: "", serial: "", ...o }));

const specFigure = (f: Fixtures, o: Record<string, string>) =>
  specActions.saveSpecFigure(initialActionState, form({ engineSpecId: f.ownSpecId, key: "journal_clearance", min: "0.04", max: "0.08", ...o }));

const seatReview = (f: Fixtures, o: Record<string, string>) =>
  reviewActions.submitSeatReview(initialActionState, form({ seatId: f.audit.seats.get("1I1")!, jobId: f.audit.jobId, decision: "approved", comment: "Even grey ring, leak test dry.", ...o }));

const approveSettled = (f: Fixtures, seatIds: string[], o: Record<string, string> = {}) => {
  const data = form({ jobId: f.audit.jobId, comment: "", ...o });
  for (const id of seatIds) data.append("seatIds", id);
  return reviewActions.submitApproveSettled(initialActionState, data);
};

const doneCheck = (f: Fixtures, o: Record<string, string>) =>
  doneCheckActions.saveDoneCheck(initialActionState, form({ seatId: f.own.seats.get("3E1")!, kind: "leak_test", result: "pass", note: "", ...o }));

/** The sign-in check behind /api/auth/callback/credentials, as next-auth calls it. */
async function signIn(credentials: unknown): Promise<ActionState> {
  const provider = authOptions.providers[0] as unknown as { options: { authorize(c: unknown, req: unknown): Promise<unknown> } };
  try {
    const user = await provider.options.authorize(credentials, {});
    return { ok: Boolean(user), message: null, fieldErrors: {} };
  } catch (err) {
    // The refusal is a code; the sign-in page shows its sentence (lib/auth/sign-in-errors.ts).
    return { ok: false, message: signInErrorMessage((err as Error).message), fieldErrors: {} };
  }
}

export const actionCases: ActionCase[] = [
  // createJob, updateJob, changeJobStatus
  { group: "job actions", name: '"NaN" cylinders', as: RHEA, field: "cylinderCount", run: () => createJob({ cylinderCount: "NaN" }) },
  { group: "job actions", name: '"Infinity" cylinders', as: RHEA, field: "cylinderCount", run: () => createJob({ cylinderCount: "Infinity" }) },
  { group: "job actions", name: '"1e309" journals', as: RHEA, field: "journalsPerCamshaft", run: () => createJob({ journalsPerCamshaft: "1e309" }) },
  { group: "job actions", name: "negative cylinders", as: RHEA, field: "cylinderCount", run: () => createJob({ cylinderCount: "-4" }) },
  { group: "job actions", name: "an unknown arrangement", as: RHEA, field: "arrangement", run: () => createJob({ arrangement: "w" }) },
  { group: "job actions", name: "cylinders as an object", as: RHEA, field: "cylinderCount", run: () => createJob({ cylinderCount: { valueOf: 4 } }) },
  { group: "job actions", name: "1 MB of notes", as: RHEA, field: "notes", run: () => createJob({ notes: HUGE(MB) }) },
  { group: "job actions", name: "a NUL byte in the engine description", as: RHEA, field: "engineDescription", run: () => createJob({ engineDescription: NUL_TEXT }) },
  { group: "job actions", name: "a date that does not exist", as: RHEA, field: "promisedOn", run: () => createJob({ promisedOn: "2026-02-31" }) },
  { group: "job actions", name: "another shop's customer", as: RHEA, field: "customerId", run: (f) => createJob({ customerId: f.other.customerId, newCustomerName: "" }) },
  { group: "job actions", name: "another shop's technician", as: RHEA, field: "assignedTechnicianId", run: (f) => createJob({ assignedTechnicianId: f.users.get("wren@ferrule.example")! }) },
  { group: "job actions", name: "another shop's engine specification", as: RHEA, field: "engineSpecId", run: (f) => createJob({ engineSpecId: f.other.specId }) },
  { group: "job actions", name: "a form that is a string", as: RHEA, run: () => jobActions.createJob("cylinders=4") },
  { group: "job actions", name: "a form that is null", as: RHEA, run: () => jobActions.createJob(null) },
  { group: "job actions", name: "a technician booking in", as: INES, message: /supervisor or an admin/, run: () => createJob({}) },
  { group: "job actions", name: "editing a job id that climbs paths", as: RHEA, run: () => jobActions.updateJob(TRAVERSAL_ID, jobForm()) },
  { group: "job actions", name: "editing another shop's job", as: RHEA, message: /your shop/, run: (f) => jobActions.updateJob(f.other.jobId, jobForm()) },
  { group: "job actions", name: "an unknown status", as: RHEA, field: "to", run: (f) => jobActions.changeJobStatus(initialActionState, form({ jobId: f.own.jobId, to: "exploded" })) },
  { group: "job actions", name: "moving another shop's job", as: RHEA, run: (f) => jobActions.changeJobStatus(initialActionState, form({ jobId: f.other.jobId, to: "awaiting_audit" })) },
  { group: "job actions", name: "handing in unfinished work unconfirmed", as: INES, field: "confirmUnfinished", message: /^Unfinished — seats not settled in fine/, run: (f) => jobActions.changeJobStatus(initialActionState, form({ jobId: f.own.jobId, to: "awaiting_audit" })) },
  { group: "job actions", name: "a hand-in confirmation that is not a tick", as: INES, field: "confirmUnfinished", run: (f) => jobActions.changeJobStatus(initialActionState, form({ jobId: f.own.jobId, to: "awaiting_audit", confirmUnfinished: "\u0000" })) },
  { group: "job actions", name: "taking back a job that is not handed in", as: INES, message: /not awaiting audit/, run: (f) => jobActions.takeHeadBack(initialActionState, form({ jobId: f.own.jobId })) },
  { group: "job actions", name: "taking back with a job id that is not one", as: INES, field: "jobId", run: () => jobActions.takeHeadBack(initialActionState, form({ jobId: "MHW-0141" })) },
  { group: "job actions", name: "taking back another shop's job", as: RHEA, message: /your shop/, run: (f) => jobActions.takeHeadBack(initialActionState, form({ jobId: f.other.jobId })) },
  { group: "job actions", name: "a technician moving another's job", as: DOV, run: (f) => jobActions.changeJobStatus(initialActionState, form({ jobId: f.own.jobId, to: "awaiting_audit" })) },

  // createCustomer, updateCustomer, and a new customer's details when booking in
  { group: "customer actions", name: "an e-mail address without an @", as: RHEA, field: "email", message: /highlighted/, run: () => createCustomer({ email: "office.larchfield.example" }) },
  { group: "customer actions", name: "a phone number with letters", as: RHEA, field: "phone", run: () => createCustomer({ phone: "call the yard" }) },
  { group: "customer actions", name: "a phone number of 40 digits", as: RHEA, field: "phone", run: () => createCustomer({ phone: "1".repeat(40) }) },
  { group: "customer actions", name: "a NUL byte in the name", as: RHEA, field: "name", run: () => createCustomer({ name: NUL_TEXT }) },
  { group: "customer actions", name: "a blank name", as: RHEA, field: "name", run: () => createCustomer({ name: "   " }) },
  { group: "customer actions", name: "a 1 MB address", as: RHEA, field: "address", run: () => createCustomer({ address: HUGE(MB) }) },
  { group: "customer actions", name: "a technician adding a customer", as: INES, message: /supervisor or an admin/, run: () => createCustomer({}) },
  { group: "customer actions", name: "editing a customer id that climbs paths", as: RHEA, field: "id", run: () => customerActions.updateCustomer(initialActionState, customerForm({ id: TRAVERSAL_ID })) },
  { group: "customer actions", name: "editing another shop's customer", as: RHEA, message: /your shop/, run: (f) => customerActions.updateCustomer(initialActionState, customerForm({ id: f.other.customerId })) },
  { group: "customer actions", name: "booking in a new customer with a bad e-mail", as: RHEA, field: "newCustomerEmail", run: () => createJob({ newCustomerEmail: "not-an-address" }) },
  { group: "customer actions", name: "booking in a new customer with a phone of letters", as: RHEA, field: "newCustomerPhone", run: () => createJob({ newCustomerPhone: "ring me" }) },

  // updateShopSettings
  { group: "shop actions", name: "a time zone that does not exist", as: ADMIN, field: "timeZone", run: () => shopSettings({ timeZone: "Europe/Lockbridge" }) },
  { group: "shop actions", name: "an offset instead of a time zone name", as: ADMIN, field: "timeZone", run: () => shopSettings({ timeZone: "+01:00" }) },
  { group: "shop actions", name: "a NUL byte in the address", as: ADMIN, field: "address", run: () => shopSettings({ address: NUL_TEXT }) },
  { group: "shop actions", name: "a phone number with letters", as: ADMIN, field: "phone", run: () => shopSettings({ phone: "ask at the gate" }) },
  { group: "shop actions", name: "another shop's name", as: ADMIN, field: "name", run: () => shopSettings({ name: "Ferrule Lane Engines" }) },
  { group: "shop actions", name: "a supervisor changing the shop", as: RHEA, message: /admin/, run: () => shopSettings({ phone: "01632 960 999" }) },

  // createUser, resetPassword, changeRole
  { group: "people actions", name: "an unknown role", as: ADMIN, field: "role", run: () => userActions.createUser({ name: "Tam Ashby", email: "tam@millrace.example", role: "root", password: "long-enough-pw" }) },
  { group: "people actions", name: "a 100 kB e-mail address", as: ADMIN, field: "email", run: () => userActions.createUser({ name: "Tam Ashby", email: `${HUGE(100_000)}@millrace.example`, role: "technician", password: "long-enough-pw" }) },
  { group: "people actions", name: "a 1 MB password", as: ADMIN, field: "password", run: () => userActions.createUser({ name: "Tam Ashby", email: "tam@millrace.example", role: "technician", password: HUGE(MB) }) },
  { group: "people actions", name: "a NUL byte in the name", as: ADMIN, field: "name", run: () => userActions.createUser({ name: "Tam\u0000Ashby", email: "tam@millrace.example", role: "technician", password: "long-enough-pw" }) },
  { group: "people actions", name: "a name that is a number", as: ADMIN, field: "name", run: () => userActions.createUser({ name: 42, email: "tam@millrace.example", role: "technician", password: "long-enough-pw" }) },
  { group: "people actions", name: "another shop's e-mail address", as: ADMIN, field: "email", run: () => userActions.createUser({ name: "Tam Ashby", email: QUILL, role: "technician", password: "long-enough-pw" }) },
  { group: "people actions", name: "resetting another shop's password", as: ADMIN, message: /your shop/, run: (f) => userActions.resetPassword(initialActionState, form({ id: f.users.get(QUILL)!, password: "long-enough-pw" })) },
  { group: "people actions", name: "resetting a person id that climbs paths", as: ADMIN, field: "id", run: () => userActions.resetPassword(initialActionState, form({ id: TRAVERSAL_ID, password: "long-enough-pw" })) },
  { group: "people actions", name: "an unknown role on change", as: ADMIN, field: "role", run: (f) => userActions.changeRole(initialActionState, form({ id: f.users.get(DOV)!, role: "owner" })) },
  { group: "people actions", name: "deactivating another shop's person", as: ADMIN, message: /your shop/, run: (f) => userActions.setActive(initialActionState, form({ id: f.users.get(QUILL)!, active: "false" })) },
  { group: "people actions", name: "active=maybe", as: ADMIN, field: "active", run: (f) => userActions.setActive(initialActionState, form({ id: f.users.get(DOV)!, active: "maybe" })) },
  { group: "people actions", name: "an admin deactivating themselves", as: ADMIN, message: /cannot deactivate yourself/, run: (f) => userActions.setActive(initialActionState, form({ id: f.users.get(ADMIN)!, active: "false" })) },
  { group: "people actions", name: "changing another shop's role", as: ADMIN, message: /your shop/, run: (f) => userActions.changeRole(initialActionState, form({ id: f.users.get(QUILL)!, role: "admin" })) },
  { group: "people actions", name: "a supervisor creating a person", as: RHEA, message: /admin/, run: () => userActions.createUser({ name: "Tam Ashby", email: "tam@millrace.example", role: "technician", password: "long-enough-pw" }) },

  // retryMailAction
  { group: "mail action", name: "a message id that climbs paths", as: ADMIN, field: "id", run: () => mailActions.retryMailAction(initialActionState, form({ id: TRAVERSAL_ID })) },
  { group: "mail action", name: "another shop's message", as: ADMIN, message: /your shop/, run: (f) => mailActions.retryMailAction(initialActionState, form({ id: f.other.mailId })) },

  // submitSeatReview, submitSeatReopen, submitHeadReview, submitHeadReopen
  { group: "review actions", name: "an unknown decision", as: RHEA, field: "decision", run: (f) => seatReview(f, { decision: "maybe" }) },
  { group: "review actions", name: "a 1 MB comment", as: RHEA, field: "comment", run: (f) => seatReview(f, { comment: HUGE(MB) }) },
  { group: "review actions", name: "a NUL byte in the comment", as: RHEA, field: "comment", run: (f) => seatReview(f, { comment: NUL_TEXT }) },
  { group: "review actions", name: "another shop's seat", as: RHEA, message: /your shop/, run: (f) => seatReview(f, { seatId: f.other.seats.get("1I1")!, jobId: f.other.jobId }) },
  { group: "review actions", name: "approving a seat that is not settled", as: RHEA, message: /only a settled seat/, run: (f) => seatReview(f, { seatId: f.own.seats.get("3I1")!, jobId: f.own.jobId }) },
  { group: "review actions", name: "reopening with a NUL byte in the reason", as: RHEA, field: "reason", run: (f) => reviewActions.submitSeatReopen(initialActionState, form({ seatId: f.audit.seats.get("1I1")!, jobId: f.audit.jobId, reason: NUL_TEXT })) },
  { group: "review actions", name: "signing off another shop's head", as: RHEA, message: /your shop/, run: (f) => reviewActions.submitHeadReview(initialActionState, form({ jobId: f.other.jobId, decision: "approved", comment: "All seats approved." })) },
  { group: "review actions", name: "reopening a head that is not signed off", as: RHEA, run: (f) => reviewActions.submitHeadReopen(initialActionState, form({ jobId: f.audit.jobId, reason: "Customer asked again." })) },
  { group: "review actions", name: "a technician signing off", as: INES, message: /supervisor/, run: (f) => seatReview(f, {}) },
  { group: "review actions", name: "sending back with no comment", as: RHEA, field: "comment", message: /Check the highlighted/, run: (f) => seatReview(f, { decision: "sent_back", comment: "" }) },
  { group: "review actions", name: "an unknown seat state as seen", as: RHEA, field: "expectedState", run: (f) => seatReview(f, { expectedState: "shiny" }) },
  { group: "review actions", name: "approving every settled seat with no seat", as: RHEA, field: "seatIds", run: (f) => approveSettled(f, []) },
  { group: "review actions", name: "approving every settled seat with a seat id that is not one", as: RHEA, field: "seatIds.0", run: (f) => approveSettled(f, ["1I1"]) },
  { group: "review actions", name: "approving every settled seat with a 1 MB comment", as: RHEA, field: "comment", run: (f) => approveSettled(f, [f.audit.seats.get("1I1")!], { comment: HUGE(MB) }) },
  { group: "review actions", name: "approving every settled seat with a NUL byte in the reason", as: RHEA, field: "checksReason", run: (f) => approveSettled(f, [f.audit.seats.get("1I1")!], { checksReason: NUL_TEXT }) },
  { group: "review actions", name: "approving every settled seat with another shop's seat", as: RHEA, message: /not on job/, run: (f) => approveSettled(f, [f.other.seats.get("1I1")!]) },
  { group: "review actions", name: "approving every settled seat of another shop's head", as: RHEA, message: /your shop/, run: (f) => approveSettled(f, [f.other.seats.get("1I1")!], { jobId: f.other.jobId }) },
  // submitHeadReview's reason for signing off an incomplete record, and submitCustomerLinkRevoke
  { group: "review actions", name: "a NUL byte in the sign-off reason", as: RHEA, field: "incompleteReason", run: (f) => reviewActions.submitHeadReview(initialActionState, form({ jobId: f.audit.jobId, decision: "approved", comment: "All seats approved.", incompleteReason: NUL_TEXT })) },
  { group: "review actions", name: "a 1 MB sign-off reason", as: RHEA, field: "incompleteReason", run: (f) => reviewActions.submitHeadReview(initialActionState, form({ jobId: f.audit.jobId, decision: "approved", comment: "All seats approved.", incompleteReason: HUGE(MB) })) },
  { group: "review actions", name: "a sign-off reason that is one letter", as: RHEA, field: "incompleteReason", run: (f) => reviewActions.submitHeadReview(initialActionState, form({ jobId: f.audit.jobId, decision: "approved", comment: "All seats approved.", incompleteReason: "x" })) },
  { group: "review actions", name: "a report link id that climbs paths", as: RHEA, field: "linkId", run: (f) => reviewActions.submitCustomerLinkRevoke(initialActionState, form({ jobId: f.audit.jobId, linkId: TRAVERSAL_ID })) },
  { group: "review actions", name: "a report link that is not in the shop", as: RHEA, message: /your shop/, run: (f) => reviewActions.submitCustomerLinkRevoke(initialActionState, form({ jobId: f.audit.jobId, linkId: randomUUID() })) },

  // saveDoneCheck, and approving without the done-checks
  { group: "done-check actions", name: "an unknown check", as: INES, field: "kind", run: (f) => doneCheck(f, { kind: "sniff_test" }) },
  { group: "done-check actions", name: "a result that is neither pass nor fail", as: INES, field: "result", run: (f) => doneCheck(f, { result: "mostly" }) },
  { group: "done-check actions", name: "a 1 MB note", as: INES, field: "note", run: (f) => doneCheck(f, { note: HUGE(MB) }) },
  { group: "done-check actions", name: "a NUL byte in the note", as: INES, field: "note", run: (f) => doneCheck(f, { note: NUL_TEXT }) },
  { group: "done-check actions", name: "a seat id that climbs paths", as: INES, field: "seatId", run: (f) => doneCheck(f, { seatId: TRAVERSAL_ID }) },
  { group: "done-check actions", name: "another shop's seat", as: RHEA, message: /your shop/, run: (f) => doneCheck(f, { seatId: f.other.seats.get("1I1")! }) },
  { group: "done-check actions", name: "another shop's photo", as: INES, field: "photoId", run: (f) => doneCheck(f, { photoId: f.other.photoId }) },
  { group: "done-check actions", name: "a photo id that is not one", as: INES, field: "photoId", run: (f) => doneCheck(f, { photoId: "ring.jpg" }) },
  { group: "done-check actions", name: "a technician on another's job", as: DOV, message: /assigned to another technician/, run: (f) => doneCheck(f, {}) },
  { group: "done-check actions", name: "a check on a signed-off head", as: RHEA, message: /signed off/, run: (f) => doneCheck(f, { seatId: f.signedOff.seatId }) },
  { group: "done-check actions", name: "approving a seat without its done-checks and without a reason", as: RHEA, field: "checksReason", message: /done-checks are not all passed/, run: (f) => seatReview(f, { seatId: f.openJob.seats.get("1I1")!, jobId: f.openJob.jobId }) },
  { group: "done-check actions", name: "a NUL byte in the reason for approving without them", as: RHEA, field: "checksReason", run: (f) => seatReview(f, { checksReason: NUL_TEXT }) },

  // the head sheets
  { group: "sheet actions", name: 'a clearance of "NaN"', as: INES, field: "value", run: (f) => clearance(f, { value: "NaN" }) },
  { group: "sheet actions", name: 'a clearance of "Infinity"', as: INES, field: "value", run: (f) => clearance(f, { value: "Infinity" }) },
  { group: "sheet actions", name: 'a clearance of "1e309"', as: INES, field: "value", run: (f) => clearance(f, { value: "1e309" }) },
  { group: "sheet actions", name: "a negative clearance", as: INES, field: "value", run: (f) => clearance(f, { value: "-0.02" }) },
  { group: "sheet actions", name: "an unknown unit", as: INES, field: "unit", run: (f) => clearance(f, { unit: "furlong" }) },
  { group: "sheet actions", name: "an unknown strip", as: INES, field: "stripId", run: (f) => clearance(f, { stripId: "mauve" }) },
  { group: "sheet actions", name: "another shop's journal", as: RHEA, field: "journalId", run: (f) => clearance(f, { journalId: f.other.journalId }) },
  { group: "sheet actions", name: 'a final torque of "Infinity"', as: INES, run: (f) => torque(f, { finalTorque: "Infinity" }) },
  { group: "sheet actions", name: "a negative cap count", as: INES, field: "capCount", run: (f) => torque(f, { capCount: "-3" }) },
  { group: "sheet actions", name: 'stage fractions of "NaN"', as: INES, run: (f) => torque(f, { stageFractions: "NaN, 1" }) },
  { group: "sheet actions", name: "an unknown torque unit", as: INES, run: (f) => torque(f, { finalTorqueUnit: "ft·kg" }) },
  { group: "sheet actions", name: "another shop's camshaft", as: RHEA, field: "camshaftId", run: (f) => torque(f, { camshaftId: f.other.camshaftId }) },
  { group: "sheet actions", name: "10 lbf·in against a 10 N·m specification, unconfirmed", as: INES, field: "confirmDeviation", message: /1\.1 N·m .*10\.0 N·m/, run: (f) => torque(f, { finalTorqueUnit: "lbf·in" }) },
  { group: "sheet actions", name: "a confirmation naming another figure", as: INES, field: "confirmDeviation", run: (f) => torque(f, { finalTorqueUnit: "lbf·in", confirmDeviation: "10.0" }) },
  { group: "sheet actions", name: "fewer caps than the camshaft's journals", as: INES, field: "capCount", message: /5 journals/, run: (f) => torque(f, { capCount: "4" }) },
  { group: "sheet actions", name: "a stage torque above the final", as: INES, field: "stageTorques", run: (f) => torque(f, { stageMode: "torques", stageTorques: "4, 12" }) },
  { group: "sheet actions", name: "an unknown way of giving stages", as: INES, field: "stageMode", run: (f) => torque(f, { stageMode: "vibes" }) },
  { group: "sheet actions", name: "undoing a tick with a NUL byte in the reason", as: INES, field: "reason", run: (f) => sheetActions.undoLastTick(initialActionState, form({ jobId: f.own.jobId, sheetId: f.other.sheetId, stage: "1", boltId: "C3-L", reason: NUL_TEXT })) },
  { group: "sheet actions", name: "undoing a tick with a 1 MB reason", as: INES, field: "reason", run: (f) => sheetActions.undoLastTick(initialActionState, form({ jobId: f.own.jobId, sheetId: f.other.sheetId, stage: "1", boltId: "C3-L", reason: HUGE(MB) })) },
  { group: "sheet actions", name: "undoing a tick on another shop's sheet", as: RHEA, run: (f) => sheetActions.undoLastTick(initialActionState, form({ jobId: f.other.jobId, sheetId: f.other.sheetId, stage: "1", boltId: "C3-L", reason: "Wrong bolt." })) },
  { group: "sheet actions", name: "a negative tick stage", as: INES, field: "stage", run: (f) => sheetActions.saveTick(initialActionState, form({ jobId: f.own.jobId, sheetId: f.other.sheetId, stage: "-1", boltId: "C3-L" })) },
  { group: "sheet actions", name: "ticking another shop's sheet", as: RHEA, run: (f) => sheetActions.saveTick(initialActionState, form({ jobId: f.other.jobId, sheetId: f.other.sheetId, stage: "1", boltId: "C3-L" })) },
  { group: "sheet actions", name: "a grid row with a width of \"1,2,3\"", as: INES, field: "seat_contact_width", run: (f) => seatRow(f, { seat_contact_width: "1,2,3" }) },
  { group: "sheet actions", name: "a grid row with a spring load in mm", as: INES, field: "spring_load", run: (f) => seatRow(f, { spring_load: "200", "spring_load.unit": "mm" }) },
  { group: "sheet actions", name: "a grid row on another shop's seat", as: RHEA, run: (f) => seatRow(f, { seatId: f.other.seats.get("1I1")! }) },
  { group: "sheet actions", name: "a grid row with a stem-guide clearance and no method", as: INES, field: "stemGuideMethod", run: (f) => seatRow(f, { stem_guide_clearance: "0.04" }) },
  { group: "sheet actions", name: "an unknown measurement kind", as: INES, field: "kind", run: (f) => measurement(f, { kind: "vibes" }) },
  { group: "sheet actions", name: 'a measurement of "1e309"', as: INES, field: "value", run: (f) => measurement(f, { value: "1e309" }) },
  { group: "sheet actions", name: "a measurement on another shop's seat", as: RHEA, run: (f) => measurement(f, { seatId: f.other.seats.get("1I1")! }) },
  { group: "sheet actions", name: "a 1 MB note on a measurement", as: INES, field: "note", run: (f) => measurement(f, { note: HUGE(MB) }) },
  { group: "sheet actions", name: "a NUL byte in a measurement note", as: INES, field: "note", run: (f) => measurement(f, { note: NUL_TEXT }) },
  { group: "sheet actions", name: "a 1 MB valve tag", as: INES, field: "tag", run: (f) => valveIdentity(f, { tag: HUGE(MB) }) },
  { group: "sheet actions", name: "a NUL byte in a part number", as: INES, field: "partNumber", run: (f) => valveIdentity(f, { partNumber: "VX-\u0000-118" }) },
  { group: "sheet actions", name: "another shop's valve", as: RHEA, run: (f) => valveIdentity(f, { valveId: f.other.valveIn.get("1I1")! }) },
  { group: "sheet actions", name: "moving a valve into another shop's seat", as: RHEA, run: (f) => sheetActions.saveValveMove(initialActionState, form({ jobId: f.own.jobId, valveId: f.own.valveIn.get("3I1")!, toSeatId: f.other.seats.get("1I1")! })) },

  // the specifications library
  { group: "spec actions", name: 'a minimum of "NaN"', as: RHEA, field: "min", run: (f) => specFigure(f, { min: "NaN" }) },
  { group: "spec actions", name: 'a maximum of "Infinity"', as: RHEA, field: "max", run: (f) => specFigure(f, { max: "Infinity" }) },
  { group: "spec actions", name: "a negative minimum", as: RHEA, field: "min", run: (f) => specFigure(f, { min: "-0.04" }) },
  { group: "spec actions", name: "an unknown figure", as: RHEA, field: "key", run: (f) => specFigure(f, { key: "flux_capacitance" }) },
  { group: "spec actions", name: "another shop's engine", as: RHEA, message: /your library/, run: (f) => specFigure(f, { engineSpecId: f.other.specId }) },
  { group: "spec actions", name: "a 1 MB engine name", as: RHEA, field: "name", run: () => specActions.createEngineSpec(initialActionState, form({ name: HUGE(MB), source: "" })) },
  { group: "spec actions", name: "a NUL byte in an engine name", as: RHEA, field: "name", run: () => specActions.createEngineSpec(initialActionState, form({ name: "Tor T14\u0000 1.4", source: "" })) },
  { group: "spec actions", name: "a unit of another quantity (lbf·ft for a clearance)", as: RHEA, field: "unit", run: (f) => specFigure(f, { unit: "lbf·ft" }) },
  { group: "spec actions", name: "an unknown unit", as: RHEA, field: "unit", run: (f) => specFigure(f, { unit: "furlong" }) },
  { group: "spec actions", name: "a clearance of 40 in (1 016 mm)", as: RHEA, field: "max", run: (f) => specFigure(f, { unit: "in", min: "0.0015", max: "40" }) },
  { group: "spec actions", name: "a cap torque of 9 000 lbf·ft", as: RHEA, field: "nominal", run: (f) => specFigure(f, { key: "cap_bolt_torque", unit: "lbf·ft", min: "", max: "", nominal: "9000" }) },
  { group: "spec actions", name: "a figure written as 1e3", as: RHEA, field: "min", run: (f) => specFigure(f, { min: "1e3" }) },
  { group: "spec actions", name: "renaming to an empty name", as: RHEA, field: "name", run: (f) => specActions.renameEngineSpec(initialActionState, form({ id: f.ownSpecId, name: " " })) },
  { group: "spec actions", name: "renaming another shop's engine", as: RHEA, message: /your library/, run: (f) => specActions.renameEngineSpec(initialActionState, form({ id: f.other.specId, name: "Taken over" })) },
  { group: "spec actions", name: "retiring with retired=maybe", as: RHEA, field: "retired", run: (f) => specActions.setEngineSpecRetired(initialActionState, form({ id: f.ownSpecId, retired: "maybe" })) },
  { group: "spec actions", name: "retiring another shop's engine", as: RHEA, message: /your library/, run: (f) => specActions.setEngineSpecRetired(initialActionState, form({ id: f.other.specId, retired: "true" })) },
  { group: "spec actions", name: "overriding another shop's job", as: RHEA, message: /your shop/, run: (f) => specActions.saveJobOverride(initialActionState, form({ jobId: f.other.jobId, reason: "Oversize journals fitted.", key: "journal_clearance", min: "0.05", max: "0.09" })) },

  // the sign-in check
  { group: "sign-in", name: "an e-mail address that is an array", as: null, run: () => signIn({ email: [INES], password: "lap-it-in-1" }) },
  { group: "sign-in", name: "a 1 MB e-mail address", as: null, run: () => signIn({ email: `${HUGE(MB)}@millrace.example`, password: "lap-it-in-1" }) },
  { group: "sign-in", name: "a 1 MB password for a real account", as: null, run: () => signIn({ email: INES, password: HUGE(MB) }) },
  { group: "sign-in", name: "a NUL byte in the e-mail address", as: null, run: () => signIn({ email: "ines\u0000@millrace.example", password: "lap-it-in-1" }) },
  { group: "sign-in", name: "no credentials at all", as: null, run: () => signIn(undefined) },
];
