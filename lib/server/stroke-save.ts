// The stroke save as the production server (server.ts) answers it, outside Next.js's request
// pipeline, with the same gate proxy.ts and next.config.ts give every other request: the origin
// check, the security headers and the signed-in check, then the same code as the route handler.
import type http from "node:http";
import { tokenUser } from "@/lib/auth/token";
import { postStrokes } from "@/lib/bench/stroke-ingest";
import { MAX_JSON_BYTES } from "@/lib/http";
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

/**
 * The body, read no further than one byte past the JSON limit: the route's own reader (readJson)
 * then refuses an oversized one with 413, as it does for the route handler. Whatever is left of
 * such a body is discarded and the connection closed after the answer.
 */
/** The phone went away before its body arrived: there is nobody to answer, and nothing was saved. */
export class RequestAbortedError extends Error {
  constructor() {
    super("The request was cut off before its body arrived.");
  }
}

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
    req.once("end", () => resolve(Buffer.concat(chunks, total)));
    req.once("error", () => reject(new RequestAbortedError()));
    req.once("close", () => {
      if (!req.complete) reject(new RequestAbortedError());
    });
  });
}

function requestHeaders(req: http.IncomingMessage): Headers {
  const headers = new Headers();
  for (let i = 0; i < req.rawHeaders.length; i += 2) headers.append(req.rawHeaders[i]!, req.rawHeaders[i + 1]!);
  return headers;
}

export async function answerStrokeSave(req: http.IncomingMessage, res: http.ServerResponse, sessionId: string): Promise<void> {
  const headers = requestHeaders(req);
  // The same refusal as proxy.ts gives every other change that does not come from our pages.
  const verdict = checkRequestOrigin("POST", headers);
  let response: Response;
  if (!verdict.ok) {
    req.resume();
    response = Response.json({ error: "forbidden", message: verdict.message }, { status: 403 });
  } else {
    // A declared length over the limit is left in the headers, where readJson refuses it.
    let body: Uint8Array<ArrayBuffer>;
    try {
      body = new Uint8Array(await readBody(req, res));
    } catch (err) {
      if (err instanceof RequestAbortedError) return;
      throw err;
    }
    const request = new Request(`http://${headers.get("host") ?? "localhost"}${req.url}`, { method: "POST", headers, body });
    response = await postStrokes(request, sessionId, () => tokenUser(request));
  }
  const body = Buffer.from(await response.arrayBuffer());
  res.statusCode = response.status;
  for (const [key, value] of Object.entries(COMMON_HEADERS)) res.setHeader(key, value);
  res.setHeader("Content-Security-Policy", API_POLICY);
  response.headers.forEach((value, key) => res.setHeader(key, value));
  res.setHeader("Content-Length", body.byteLength);
  res.end(body);
}
