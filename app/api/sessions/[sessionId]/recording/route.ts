import { and, eq } from "drizzle-orm";
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { heads, jobs, lappingSessions, seats } from "@/db/schema";
import { guardedRoute } from "@/lib/auth/guard";
import { SESSION_NOT_FOUND } from "@/lib/bench/rules";
import { getSessionForUpload } from "@/lib/bench/service";
import { NotFoundError } from "@/lib/errors";
import { parseId } from "@/lib/http";
import { declaredBody } from "@/lib/storage/intact";
import { blobStore } from "@/lib/storage";
import { MAX_RECORDING_BYTES, storeRecording, tooLargeRecording } from "@/lib/storage/recording-upload";

/**
 * Stores the session's compressed recording, streamed to storage, replacing an earlier upload.
 * The kind is read from the first bytes, so the declared content type is not trusted.
 */
export const PUT = guardedRoute("jobs:work", async (req, ctx: RouteContext<"/api/sessions/[sessionId]/recording">, actor) => {
  const { sessionId } = await ctx.params;
  const id = parseId(sessionId, "sessionId");
  const db = await getDb();
  await getSessionForUpload(db, actor, id);
  const declared = declaredBody(req.headers);
  // Refused before the body is read: a declared size over the limit will not fit.
  if ((declared.bytes ?? 0) > MAX_RECORDING_BYTES) throw tooLargeRecording();
  const stored = await storeRecording(db, actor, id, req.body, declared);
  return NextResponse.json({ ok: true, bytes: stored.bytes }, { status: 201 });
});

type ByteRange = { start: number; end: number } | "unsatisfiable" | null;

/**
 * One "bytes=a-b", "bytes=a-" or "bytes=-n" range against an object of `size` bytes. Anything
 * else (several ranges, another unit, garbage) is ignored and the whole object is sent, which
 * RFC 9110 allows; the audio element only ever asks for one range.
 */
function parseRange(header: string | null, size: number): ByteRange {
  if (!header) return null;
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!m || (m[1] === "" && m[2] === "")) return null;
  if (m[1] === "") {
    // A suffix range: the last n bytes.
    const n = Number(m[2]);
    if (n === 0 || size === 0) return "unsatisfiable";
    return { start: Math.max(0, size - n), end: size - 1 };
  }
  const start = Number(m[1]);
  const end = m[2] === "" ? size - 1 : Math.min(Number(m[2]), size - 1);
  if (m[2] !== "" && Number(m[2]) < start) return null;
  if (start >= size) return "unsatisfiable";
  return { start, end };
}

/** Sends the session's recording to anyone in its shop who may read jobs, with byte ranges so players can seek. */
export const GET = guardedRoute("jobs:read", async (req, ctx: RouteContext<"/api/sessions/[sessionId]/recording">, actor) => {
  const { sessionId } = await ctx.params;
  const id = parseId(sessionId, "sessionId");
  const db = await getDb();
  const [row] = await db
    .select({ key: lappingSessions.recordingKey, type: lappingSessions.recordingType })
    .from(lappingSessions)
    .innerJoin(seats, eq(seats.id, lappingSessions.seatId))
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(lappingSessions.id, id), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  // Another shop's session answers exactly like a missing one, so ids reveal nothing.
  if (!row) throw new NotFoundError(SESSION_NOT_FOUND);
  const noRecording = new NotFoundError("This session was not recorded.");
  if (!row.key) throw noRecording;
  const store = blobStore();
  const size = await store.size(row.key);
  if (size === null) throw noRecording;
  const headers: Record<string, string> = {
    "content-type": row.type ?? "application/octet-stream",
    "accept-ranges": "bytes",
    // A later upload replaces the recording under the same URL, so caches must ask again.
    "cache-control": "private, no-cache",
  };
  const range = store.getRange ? parseRange(req.headers.get("range"), size) : null;
  if (range === "unsatisfiable") {
    return NextResponse.json(
      { error: "range_not_satisfiable", message: `The recording is ${size} bytes long; ask for a range inside it.` },
      { status: 416, headers: { "content-range": `bytes */${size}`, "accept-ranges": "bytes" } },
    );
  }
  if (range && store.getRange) {
    const body = await store.getRange(row.key, range.start, range.end);
    if (!body) throw noRecording;
    return new Response(body, {
      status: 206,
      headers: {
        ...headers,
        "content-range": `bytes ${range.start}-${range.end}/${size}`,
        "content-length": String(range.end - range.start + 1),
      },
    });
  }
  const body = await store.get(row.key);
  if (!body) throw noRecording;
  return new Response(body, { status: 200, headers: { ...headers, "content-length": String(size) } });
});
