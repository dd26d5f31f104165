// Resumable upload of a session's recording: the bench screen sends it in chunks with
// Content-Range, and after a dropped connection asks how much arrived and goes on from there.
// Chunks are kept as separate objects under a temporary prefix (the BlobStore has no append),
// with a small manifest of what has arrived; the last chunk assembles, sniffs and stores them.
import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { guardedRoute, type Actor } from "@/lib/auth/guard";
import { getSessionForUpload } from "@/lib/bench/service";
import { BadRequestError, UnsupportedMediaTypeError } from "@/lib/errors";
import { parseId } from "@/lib/http";
import { blobStore, TooLargeError, type BlobStore } from "@/lib/storage";
import { oneAtATime } from "@/lib/storage/one-at-a-time";
import { MAX_RECORDING_BYTES, sniffRecording, storeRecording, tooLargeRecording } from "@/lib/storage/recording-upload";

type Ctx = { params: Promise<{ sessionId: string }> };

const manifestSchema = z.object({
  total: z.number().int().positive(),
  parts: z.array(z.object({ start: z.number().int().min(0), bytes: z.number().int().positive() })),
});
type Manifest = z.infer<typeof manifestSchema>;

const prefix = (id: string) => `uploads/recordings/${id}`;
const manifestKey = (id: string) => `${prefix(id)}/manifest.json`;
const partKey = (id: string, start: number) => `${prefix(id)}/${start}.part`;
const received = (m: Manifest | null) => (m ? m.parts.reduce((n, p) => n + p.bytes, 0) : 0);

async function readManifest(store: BlobStore, id: string): Promise<Manifest | null> {
  const body = await store.get(manifestKey(id));
  if (!body) return null;
  const parsed = manifestSchema.safeParse(JSON.parse(await new Response(body).text()));
  // A manifest we cannot read is treated as no upload in progress: the client starts again.
  return parsed.success ? parsed.data : null;
}

const writeManifest = (store: BlobStore, id: string, m: Manifest) =>
  store.put(manifestKey(id), new TextEncoder().encode(JSON.stringify(m)));

async function discard(store: BlobStore, id: string, m: Manifest | null): Promise<void> {
  for (const p of m?.parts ?? []) await store.delete(partKey(id, p.start));
  await store.delete(manifestKey(id));
}

/** The parts in order, as one stream. */
function assembled(store: BlobStore, id: string, m: Manifest): ReadableStream<Uint8Array> {
  const parts = [...m.parts].sort((a, b) => a.start - b.start);
  let index = 0;
  let current: ReadableStreamDefaultReader<Uint8Array> | null = null;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      for (;;) {
        if (!current) {
          const part = parts[index++];
          if (!part) return controller.close();
          const body = await store.get(partKey(id, part.start));
          if (!body) return controller.error(new Error(`chunk at ${part.start} is missing`));
          current = body.getReader();
        }
        const next = await current.read();
        if (!next.done) return controller.enqueue(next.value);
        current = null;
      }
    },
    cancel: (reason) => current?.cancel(reason),
  });
}

const status = (m: Manifest | null) => ({ received: received(m), total: m?.total ?? null });

/** How many bytes of the upload in progress the server has: JSON `{ received, total }`. */
export const GET = guardedRoute("jobs:work", async (_req, ctx: Ctx, actor) => {
  const id = parseId((await ctx.params).sessionId, "sessionId");
  await getSessionForUpload(await getDb(), actor, id);
  return NextResponse.json(status(await readManifest(blobStore(), id)), { headers: { "cache-control": "no-store" } });
});

/** The same as GET, in headers: Upload-Offset and (when an upload is in progress) Upload-Length. */
export const HEAD = guardedRoute("jobs:work", async (_req, ctx: Ctx, actor) => {
  const id = parseId((await ctx.params).sessionId, "sessionId");
  await getSessionForUpload(await getDb(), actor, id);
  const s = status(await readManifest(blobStore(), id));
  const headers: Record<string, string> = { "upload-offset": String(s.received), "cache-control": "no-store" };
  if (s.total !== null) headers["upload-length"] = String(s.total);
  return new Response(null, { status: 200, headers });
});

const RANGE = /^bytes (\d{1,12})-(\d{1,12})\/(\d{1,12})$/;

/**
 * One chunk, `Content-Range: bytes start-end/total`. A chunk already received is acknowledged
 * again (its reply may have been lost); one that would leave a gap is refused with 409 naming
 * the offset expected. The chunk that completes the upload stores the recording (201).
 */
export const PUT = guardedRoute("jobs:work", async (req, ctx: Ctx, actor) => {
  const id = parseId((await ctx.params).sessionId, "sessionId");
  // One chunk of a session's upload at a time: each reads the manifest, adds to it and writes it back.
  return oneAtATime(`recording-chunks/${id}`, () => putChunk(req, id, actor));
});

async function putChunk(req: Request, id: string, actor: Actor): Promise<Response> {
  const db = await getDb();
  await getSessionForUpload(db, actor, id);
  const m = RANGE.exec(req.headers.get("content-range")?.trim() ?? "");
  if (!m) throw new BadRequestError("Send each chunk with a Content-Range header of the form bytes start-end/total.");
  const [start, end, total] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (end < start || end >= total) throw new BadRequestError(`The range ${start}-${end} does not fit a recording of ${total} bytes.`);
  if (total > MAX_RECORDING_BYTES) throw tooLargeRecording();
  const length = end - start + 1;
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) !== length) throw new BadRequestError(`The chunk ${start}-${end} must be ${length} bytes long.`);

  const store = blobStore();
  let manifest = await readManifest(store, id);
  if (manifest && manifest.total !== total) {
    if (start !== 0) return conflict(`The upload in progress is ${manifest.total} bytes long, not ${total}; start again from byte 0.`, 0);
    // A new recording replaces the unfinished one.
    await discard(store, id, manifest);
    manifest = null;
  }
  const have = received(manifest);
  if (end < have) {
    await req.body?.cancel().catch(() => {});
    return NextResponse.json(status(manifest));
  }
  if (start !== have) return conflict(`Expected the chunk starting at byte ${have}; resend from there.`, have);

  if (!req.body) throw new BadRequestError("The chunk is empty.");
  let body: ReadableStream<Uint8Array> = req.body;
  // The first chunk is checked at once, so a wrong file is refused before the rest is sent.
  if (start === 0) {
    const sniffed = await sniffRecording(body);
    if (!sniffed) throw new BadRequestError("The chunk is empty.");
    body = sniffed.stream;
  }
  const key = partKey(id, start);
  let bytes: number;
  try {
    ({ bytes } = await store.put(key, body, { maxBytes: length }));
  } catch (err) {
    if (err instanceof TooLargeError) throw new BadRequestError(`The chunk ${start}-${end} is longer than ${length} bytes.`);
    throw err;
  }
  if (bytes !== length) {
    await store.delete(key);
    throw new BadRequestError(`The chunk ${start}-${end} arrived with ${bytes} bytes instead of ${length}; resend it.`);
  }
  manifest = { total, parts: [...(manifest?.parts ?? []), { start, bytes }] };
  await writeManifest(store, id, manifest);
  if (start + length < total) return NextResponse.json(status(manifest));

  try {
    const stored = await storeRecording(db, actor, id, assembled(store, id, manifest), { bytes: total, sha256: null });
    await discard(store, id, manifest);
    return NextResponse.json({ ok: true, bytes: stored.bytes }, { status: 201 });
  } catch (err) {
    // A recording that is not one will not become one by resending: start clean.
    if (err instanceof UnsupportedMediaTypeError) await discard(store, id, manifest);
    throw err;
  }
}

function conflict(message: string, expectedOffset: number) {
  return NextResponse.json(
    { error: "conflict", message, expectedOffset },
    { status: 409, headers: { "upload-offset": String(expectedOffset) } },
  );
}
