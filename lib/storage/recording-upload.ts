// The rules one session recording has to meet, shared by the single upload and the chunked one.
import { randomUUID } from "node:crypto";
import type { Db } from "@/db/client";
import type { Actor } from "@/lib/auth/guard";
import { attachRecording, getSessionForUpload } from "@/lib/bench/service";
import { BadRequestError, PayloadTooLargeError, UnsupportedMediaTypeError } from "@/lib/errors";
import { blobStore } from "./index";
import { NOTHING_DECLARED, storeWhole, type DeclaredBody } from "./intact";
import { MAX_RECORDING_BYTES } from "./limits";
import { isKeptRecording, NOT_A_RECORDING, peekStream, sniff, type Sniffed } from "./sniff";

export { MAX_RECORDING_BYTES };

export const tooLargeRecording = () => new PayloadTooLargeError(`Recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB.`);

/**
 * The body with its kind read from its first bytes, whatever the declared type says.
 * Null when the body is empty; throws UnsupportedMediaTypeError when it is not a recording we keep.
 */
export async function sniffRecording(
  body: ReadableStream<Uint8Array>,
): Promise<{ sniffed: Sniffed; stream: ReadableStream<Uint8Array> } | null> {
  const peeked = await peekStream(body);
  if (!peeked) return null;
  const sniffed = sniff(peeked.head);
  if (!sniffed || !isKeptRecording(sniffed)) {
    await peeked.stream.cancel().catch(() => {});
    throw new UnsupportedMediaTypeError(NOT_A_RECORDING);
  }
  return { sniffed, stream: peeked.stream };
}

/**
 * Storage key of one upload of a session's recording; the extension follows the sniffed kind.
 * Every upload has a key of its own, so two at once never write over each other, and an upload
 * refused at the last moment (the seat was signed off meanwhile) never touches the kept one.
 */
export const recordingKey = (sessionId: string, s: Sniffed) => `recordings/${sessionId}-${randomUUID()}.${s.ext}`;

/**
 * Sniffs, stores and attaches a session's recording, replacing an earlier one. Checked before
 * storing: an empty or foreign upload must not replace a recording already kept.
 */
export async function storeRecording(
  db: Db,
  actor: Actor,
  sessionId: string,
  body: ReadableStream<Uint8Array> | null,
  declared: DeclaredBody = NOTHING_DECLARED,
): Promise<{ key: string; type: string; bytes: number }> {
  const ctx = await getSessionForUpload(db, actor, sessionId);
  const accepted = body ? await sniffRecording(body) : null;
  if (!accepted) throw new BadRequestError("The recording is empty.");
  const key = recordingKey(sessionId, accepted.sniffed);
  const store = blobStore();
  const bytes = await storeWhole(store, key, accepted.stream, { maxBytes: MAX_RECORDING_BYTES, tooLarge: tooLargeRecording }, declared, "recording");
  const recording = { key, type: accepted.sniffed.type, bytes };
  let previous: string | null;
  try {
    previous = await attachRecording(db, actor, sessionId, recording);
  } catch (err) {
    // No row points at these bytes, so they must not stay in storage.
    await store.delete(key).catch(() => {});
    throw err;
  }
  // The recording replaced is no longer pointed at by anything.
  if (previous && previous !== key) await store.delete(previous).catch(() => {});
  return recording;
}
