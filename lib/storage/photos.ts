// Photos of a seat's contact ring: checked from their bytes, kept in blob storage, listed on the
// review page and in the report. Adding one is work on the job, so it follows the same rules as
// recording strokes: the technician on the job or a supervisor, never on a signed-off seat or job.
import { randomUUID } from "node:crypto";
import { and, asc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { seatWithJob } from "@/db/queries/jobs";
import { heads, jobs, seatPhotos, seats, users, type Job, type Seat } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import type { Actor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { BadRequestError, ConflictError, NotFoundError, PayloadTooLargeError, UnsupportedMediaTypeError } from "@/lib/errors";
import { holdJob, signedOffSeats } from "@/lib/jobs/hold";
import { isClosed } from "@/lib/jobs/lifecycle";
import { blobStore } from "./index";
import { NOTHING_DECLARED, storeWhole, type DeclaredBody } from "./intact";
import { peekStream, sniff } from "./sniff";

/** A phone camera's JPEG is 2–6 MB; 10 MB leaves room for a large PNG without taking anything. */
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;

export const tooLargePhoto = () => new PayloadTooLargeError(`Photos are limited to ${MAX_PHOTO_BYTES / 1048576} MB. Take it again at a lower resolution.`);

export interface SeatPhoto {
  id: string;
  type: string;
  bytes: number;
  takenBy: string;
  createdAt: string;
  url: string;
}

const loadSeat = seatWithJob;

function assertPhotoAllowed(seat: Pick<Seat, "state">, job: Pick<Job, "status" | "number">): void {
  if (seat.state === "approved") throw new ConflictError("This seat is signed off. A supervisor must reopen it before photos are added.");
  if (isClosed(job.status)) throw new ConflictError(signedOffSeats(job));
}

/** Checks, stores and records one photo of the seat. */
export async function addSeatPhoto(
  db: Db,
  actor: Actor,
  seatId: string,
  body: ReadableStream<Uint8Array> | null,
  declared: DeclaredBody = NOTHING_DECLARED,
): Promise<SeatPhoto> {
  const { seat, job } = await loadSeat(db, actor.shopId, seatId);
  assertCanWorkOn(actor, job);
  assertPhotoAllowed(seat, job);

  const peeked = body ? await peekStream(body) : null;
  if (!peeked) throw new BadRequestError("The photo is empty.");
  const kind = sniff(peeked.head);
  if (!kind || !(kind.kind === "jpeg" || kind.kind === "png" || kind.kind === "webp")) {
    await peeked.stream.cancel().catch(() => {});
    throw new UnsupportedMediaTypeError(
      kind?.kind === "heic"
        ? "HEIC photos cannot be shown in every browser. Set the camera to save JPEG (Most Compatible) and take it again."
        : "Photos must be JPEG, PNG or WebP images.",
    );
  }

  const id = randomUUID();
  const key = `photos/${seatId}/${id}.${kind.ext}`;
  const store = blobStore();
  const bytes = await storeWhole(store, key, peeked.stream, { maxBytes: MAX_PHOTO_BYTES, tooLarge: tooLargePhoto }, declared, "photo");
  try {
    const row = await db.transaction(async (tx) => {
      // Checked again with the job held against sign-off: the seat and job as they are now.
      const now = await holdJob(tx, job.id);
      const [seatNow] = await tx.select().from(seats).where(eq(seats.id, seatId)).limit(1);
      assertPhotoAllowed(seatNow ?? seat, now);
      const [inserted] = await tx.insert(seatPhotos).values({ id, seatId, key, type: kind.type, bytes, takenById: actor.id }).returning();
      await recordAudit(tx, {
        actorId: actor.id,
        action: "seat.photo_added",
        entityType: "seat",
        entityId: seatId,
        jobId: job.id,
        after: { photoId: id, type: kind.type, bytes },
      });
      return inserted!;
    });
    return { id, type: row.type, bytes: row.bytes, takenBy: actor.name, createdAt: row.createdAt.toISOString(), url: `/api/photos/${id}` };
  } catch (err) {
    // No row points at the image, so it must not stay in storage.
    await store.delete(key).catch(() => {});
    throw err;
  }
}

/** The seat's photos, oldest first. */
export async function listSeatPhotos(db: Db, actor: Actor, seatId: string): Promise<SeatPhoto[]> {
  await loadSeat(db, actor.shopId, seatId);
  const rows = await db
    .select({ photo: seatPhotos, takenBy: users.name })
    .from(seatPhotos)
    .innerJoin(users, eq(users.id, seatPhotos.takenById))
    .where(eq(seatPhotos.seatId, seatId))
    .orderBy(asc(seatPhotos.createdAt), asc(seatPhotos.id));
  return rows.map(({ photo, takenBy }) => ({
    id: photo.id,
    type: photo.type,
    bytes: photo.bytes,
    takenBy,
    createdAt: photo.createdAt.toISOString(),
    url: `/api/photos/${photo.id}`,
  }));
}

/** Every photo of a job's seats in one query, for the report, in head order then oldest first. */
export async function listJobPhotos(db: Db, shopId: string, jobId: string): Promise<Array<SeatPhoto & { seat: Pick<Seat, "cylinder" | "kind" | "position"> }>> {
  const rows = await db
    .select({ photo: seatPhotos, takenBy: users.name, seat: { cylinder: seats.cylinder, kind: seats.kind, position: seats.position } })
    .from(seatPhotos)
    .innerJoin(users, eq(users.id, seatPhotos.takenById))
    .innerJoin(seats, eq(seats.id, seatPhotos.seatId))
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)))
    .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position), asc(seatPhotos.createdAt), asc(seatPhotos.id));
  return rows.map(({ photo, takenBy, seat }) => ({
    id: photo.id,
    type: photo.type,
    bytes: photo.bytes,
    takenBy,
    createdAt: photo.createdAt.toISOString(),
    url: `/api/photos/${photo.id}`,
    seat,
  }));
}

/** One photo of the caller's shop, or NotFoundError. */
export async function getPhoto(db: Db, actor: Actor, photoId: string): Promise<{ key: string; type: string; bytes: number }> {
  const [row] = await db
    .select({ key: seatPhotos.key, type: seatPhotos.type, bytes: seatPhotos.bytes })
    .from(seatPhotos)
    .innerJoin(seats, eq(seats.id, seatPhotos.seatId))
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seatPhotos.id, photoId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That photo does not exist in your shop.");
  return row;
}
