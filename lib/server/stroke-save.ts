// The stroke save as the production server (server.ts) answers it, outside Next.js's request
// pipeline, with the same gate proxy.ts and next.config.ts give every other request: the origin
// check, the security headers and the signed-in check, then the same code as the route handler.
import type http from "node:http";
import { tokenUser } from "@/lib/auth/token";
import { answerStrokes } from "@/lib/bench/stroke-ingest";
import { MAX_JSON_BYTES, readJsonBytes } from "@/lib/http";
import { API_POLICY, checkRequestOrigin, COMMON_HEADERS } from "@/lib/security/headers";

const STROKE_SAVE = /^\/api\/sessions\/([^/]+)\/strokes$/;

/** The session id of a stroke save (POST /api/sessions/{id}/strokes), or null for any other request. */
export function strokeSaveTarget(method: string | undefined, url: string | undefined): string | null {
  if (method !== "POST" || !url) return null;
  const q = url.indexOf("?");
  const m = STROKE_SAVE.exec(q < 0 ? url : url.slice(0, q));
  if (!m) return null;
  try {
    return decodeURIComponent(m[1]!);
  } catch {
    return m[1]!;
  }
}

/** The phone went away before its body arrived: there is nobody to answer, and nothing was saved. */
export class RequestAbortedError extends Error {
  constructor() {
    super("The request was cut off before its body arrived.");
  }
}

/**
 * The body, read no further than one byte past the JSON limit: readJsonBytes then refuses an
 * oversized one with 413, as readJson does for the route handler. Whatever is left of such a
 * body is discarded and the connection closed after the answer.
 */
function readBody(req: http.IncomingMessage, res: http.ServerResponse): Promise<Buffer> {
  const declared = Number(req.headers["content-length"]);
  if (Number.isFinite(declared) && declared > MAX_JSON_BYTES) {
    res.setHeader("Connection", "close");
    req.resume();
    return Promise.resolve(Buffer.alloc(0));
  }
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let total = 0;
    const onData = (chunk: Buffer) => {
      chunks.push(chunk);
      total += chunk.byteLength;
      if (total > MAX_JSON_BYTES) {
        req.off("data", onData);
        res.setHeader("Connection", "close");
        req.resume();
        resolve(Buffer.concat(chunks, total));
      }
    };
    req.on("data", onData);
    req.once("end", () => resolve(chunks.length === 1 ? chunks[0]! : Buffer.concat(chunks, total)));
    req.once("error", () => reject(new RequestAbortedError()));
    req.once("close", () => {
      if (!req.complete) reject(new RequestAbortedError());
    });
  });
}

/** A header as Headers.get gives it: repeated values joined with ", ", null when absent. */
function header(req: http.IncomingMessage, name: string): string | null {
  const value = req.headers[name];
  if (value === undefined) return null;
  return Array.isArray(value) ? value.join(", ") : value;
}

// Node's request headers, read as the web Headers that proxy.ts's origin check takes.
function originHeaders(req: http.IncomingMessage): Pick<Headers, "get"> {
  return { get: (name: string) => header(req, name.toLowerCase()) };
}

export async function answerStrokeSave(req: http.IncomingMessage, res: http.ServerResponse, sessionId: string): Promise<void> {
  // The same refusal as proxy.ts gives every other change that does not come from our pages.
  const verdict = checkRequestOrigin("POST", originHeaders(req));
  let answer: { status: number; body: unknown };
  if (!verdict.ok) {
    req.resume();
    answer = { status: 403, body: { error: "forbidden", message: verdict.message } };
  } else {
    let body: Buffer;
    try {
      body = await readBody(req, res);
    } catch (err) {
      if (err instanceof RequestAbortedError) return;
      throw err;
    }
    // A declared length over the limit is passed on, where readJsonBytes refuses it as readJson does.
    const head = { contentType: header(req, "content-type"), contentLength: header(req, "content-length") };
    answer = await answerStrokes(async (schema) => readJsonBytes(head, body, schema), sessionId, () => tokenUser(req.headers));
  }
  const json = Buffer.from(JSON.stringify(answer.body));
  res.statusCode = answer.status;
  for (const [key, value] of Object.entries(COMMON_HEADERS)) res.setHeader(key, value);
  res.setHeader("Content-Security-Policy", API_POLICY);
  res.setHeader("Content-Type", "application/json");
  res.setHeader("Content-Length", json.byteLength);
  res.end(json);
}
