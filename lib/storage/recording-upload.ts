// The rules one session recording has to meet, shared by the single upload and the chunked one.
import type { Db } from "@/db/client";
import type { Actor } from "@/lib/auth/guard";
import { attachRecording, getSessionForUpload } from "@/lib/bench/service";
import { BadRequestError, PayloadTooLargeError, UnsupportedMediaTypeError } from "@/lib/errors";
import { blobStore, TooLargeError } from "./index";
import { peekStream, sniff, type Sniffed } from "./sniff";

/** 60 minutes of Opus at 64 kbit/s is about 29 MB; anything much larger is not a bench recording. */
export const MAX_RECORDING_BYTES = 64 * 1024 * 1024;

export const tooLargeRecording = () => new PayloadTooLargeError(`Recordings are limited to ${MAX_RECORDING_BYTES / 1048576} MB.`);

/**
 * WebM (what Chrome's and Android's recorder writes), Ogg Opus (Firefox's) and WAV (the
 * analyzer's own format). Other Ogg codecs and plain Matroska are refused because the review
 * page's player and decoder are only tested with these.
 */
function acceptedRecording(s: Sniffed | null): s is Sniffed {
  return !!s && (s.kind === "webm" || s.kind === "wav" || (s.kind === "ogg" && s.codec === "opus"));
}

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
  if (!acceptedRecording(sniffed)) {
    await peeked.stream.cancel().catch(() => {});
    throw new UnsupportedMediaTypeError("Recordings must be WebM, Ogg Opus or WAV audio; this file is none of them. Record again on the bench screen.");
  }
  return { sniffed, stream: peeked.stream };
}

/** Storage key of a session's recording; the extension follows the sniffed kind. */
export const recordingKey = (sessionId: string, s: Sniffed) => `recordings/${sessionId}.${s.ext}`;

/**
 * Sniffs, stores and attaches a session's recording, replacing an earlier one. Checked before
 * storing: an empty or foreign upload must not replace a recording already kept.
 */
export async function storeRecording(
  db: Db,
  actor: Actor,
  sessionId: string,
  body: ReadableStream<Uint8Array> | null,
): Promise<{ key: string; type: string; bytes: number }> {
  const ctx = await getSessionForUpload(db, actor, sessionId);
  const accepted = body ? await sniffRecording(body) : null;
  if (!accepted) throw new BadRequestError("The recording is empty.");
  const key = recordingKey(sessionId, accepted.sniffed);
  const store = blobStore();
  let bytes: number;
  try {
    ({ bytes } = await store.put(key, accepted.stream, { maxBytes: MAX_RECORDING_BYTES }));
  } catch (err) {
    if (err instanceof TooLargeError) throw tooLargeRecording();
    throw err;
  }
  const recording = { key, type: accepted.sniffed.type, bytes };
  await attachRecording(db, actor, sessionId, recording);
  // A WebM upload replacing a WAV lands under another key; the old one would be kept for nothing.
  const previous = ctx.session.recordingKey;
  if (previous && previous !== key) await store.delete(previous).catch(() => {});
  return recording;
}
