import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { attachRecording, getSessionForUpload } from "@/lib/bench/service";
import { AppError, BadRequestError } from "@/lib/errors";
import { parseId } from "@/lib/http";
import { blobStore, TooLargeError } from "@/lib/storage";

/** 60 minutes of Opus at 64 kbit/s is about 29 MB; anything much larger is not a bench recording. */
const MAX_RECORDING_BYTES = 64 * 1024 * 1024;
const ACCEPTED = /^audio\/(webm|ogg|mp4|wav|x-wav)(;.*)?$/i;

class PayloadTooLarge extends AppError {
  override readonly status = 413;
}
class UnsupportedType extends AppError {
  override readonly status = 415;
}

/** The body with its first bytes read ahead, or null when it has none. */
async function nonEmpty(body: ReadableStream<Uint8Array>): Promise<ReadableStream<Uint8Array> | null> {
  const reader = body.getReader();
  let first = await reader.read();
  while (!first.done && first.value.byteLength === 0) first = await reader.read();
  if (first.done) return null;
  let head: Uint8Array | null = first.value;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (head) {
        controller.enqueue(head);
        head = null;
        return;
      }
      const next = await reader.read();
      if (next.done) controller.close();
      else controller.enqueue(next.value);
    },
    cancel: (reason) => reader.cancel(reason),
  });
}

/** Stores the session's compressed recording, streamed to storage, replacing an earlier upload. */
export const PUT = guardedRoute("jobs:work", async (req, ctx: RouteContext<"/api/sessions/[sessionId]/recording">, actor) => {
  const { sessionId } = await ctx.params;
  const id = parseId(sessionId, "sessionId");
  const db = await getDb();
  await getSessionForUpload(db, actor, id);
  const type = req.headers.get("content-type") ?? "";
  if (!ACCEPTED.test(type)) throw new UnsupportedType("Recordings must be WebM, Ogg, MP4 or WAV audio.");
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > MAX_RECORDING_BYTES) throw new PayloadTooLarge(`Recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB.`);
  // Checked before storing: an empty upload must not replace a recording already kept.
  const body = req.body ? await nonEmpty(req.body) : null;
  if (!body) throw new BadRequestError("The recording is empty.");
  const ext = type.includes("ogg") ? "ogg" : type.includes("wav") ? "wav" : type.includes("mp4") ? "m4a" : "webm";
  const key = `recordings/${id}.${ext}`;
  try {
    const stored = await blobStore().put(key, body, { maxBytes: MAX_RECORDING_BYTES });
    await attachRecording(db, actor, id, { key, type: type.split(";")[0]!, bytes: stored.bytes });
    return NextResponse.json({ ok: true, bytes: stored.bytes }, { status: 201 });
  } catch (err) {
    if (err instanceof TooLargeError) throw new PayloadTooLarge(`Recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB.`);
    throw err;
  }
});
