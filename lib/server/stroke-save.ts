// The stroke save as the production server (server.ts) answers it, outside Next.js's request
// pipeline, with the same gate proxy.ts and next.config.ts give every other request: the origin
// check, the security headers and the signed-in check, then the same code as the route handler.
import type http from "node:http";
import { Readable } from "node:stream";
import { tokenUser } from "@/lib/auth/token";
import { postStrokes } from "@/lib/bench/stroke-ingest";
import { API_POLICY, checkOrigin, COMMON_HEADERS } from "@/lib/security/headers";

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

function requestHeaders(req: http.IncomingMessage): Headers {
  const headers = new Headers();
  for (let i = 0; i < req.rawHeaders.length; i += 2) headers.append(req.rawHeaders[i]!, req.rawHeaders[i + 1]!);
  return headers;
}

export async function answerStrokeSave(req: http.IncomingMessage, res: http.ServerResponse, sessionId: string): Promise<void> {
  const headers = requestHeaders(req);
  // The same refusal as proxy.ts gives every other change that does not come from our pages.
  const verdict = checkOrigin({
    method: "POST",
    origin: headers.get("origin"),
    referer: headers.get("referer"),
    hosts: [headers.get("host"), headers.get("x-forwarded-host")],
    allowedOrigins: process.env.NEXTAUTH_URL ? [process.env.NEXTAUTH_URL] : [],
  });
  let response: Response;
  if (!verdict.ok) {
    req.resume();
    response = Response.json({ error: "forbidden", message: verdict.message }, { status: 403 });
  } else {
    const request = new Request(`http://${headers.get("host") ?? "localhost"}${req.url}`, {
      method: "POST",
      headers,
      body: Readable.toWeb(req) as ReadableStream<Uint8Array>,
      duplex: "half",
    } as RequestInit);
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
