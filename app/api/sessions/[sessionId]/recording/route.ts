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
  if (!req.body) throw new BadRequestError("The recording is empty.");
  const ext = type.includes("ogg") ? "ogg" : type.includes("wav") ? "wav" : type.includes("mp4") ? "m4a" : "webm";
  const key = `recordings/${id}.${ext}`;
  try {
    const stored = await blobStore().put(key, req.body, { maxBytes: MAX_RECORDING_BYTES });
    if (stored.bytes === 0) throw new BadRequestError("The recording is empty.");
    await attachRecording(db, actor, id, { key, type: type.split(";")[0]!, bytes: stored.bytes });
    return NextResponse.json({ ok: true, bytes: stored.bytes }, { status: 201 });
  } catch (err) {
    if (err instanceof TooLargeError) throw new PayloadTooLarge(`Recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB.`);
    throw err;
  }
});
