// Seat photos: who may add and see them, which images are kept (read from the bytes), the size
// limit, signed-off seats and jobs refused, and the image served back byte for byte.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { seatPhotos } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { auditFor, BASE_URL, bodyOf, seatId as findSeat, setJob, setSeatState, userIds } from "../bench/helpers";
import { concat, ebmlHeader, heicHead, jpegHead, pngHead, webpHead } from "./fixtures";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-photos-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const photosRoute = await import("@/app/api/seats/[seatId]/photos/route");
const photoRoute = await import("@/app/api/photos/[photoId]/route");

let ids: Map<string, string>;
let seat: string;
const db = () => state.t!.db;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};
const photosDir = () => path.join(dataDir, "blobs", "photos", seat);
const storedFiles = () => (fs.existsSync(photosDir()) ? fs.readdirSync(photosDir()) : []);

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ids = await userIds(state.t.db);
  seat = await findSeat(state.t.db, "MHW-0141", "4I1");
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

function post(body: Uint8Array | ReadableStream<Uint8Array>, headers: Record<string, string> = {}, seatId = seat) {
  const req = new NextRequest(`${BASE_URL}/api/seats/${seatId}/photos`, {
    method: "POST",
    headers,
    body: body instanceof Uint8Array ? Buffer.from(body) : body,
    duplex: "half",
  } as ConstructorParameters<typeof NextRequest>[1]);
  return photosRoute.POST(req, { params: Promise.resolve({ seatId }) });
}
const list = async () => {
  const res = await photosRoute.GET(new NextRequest(`${BASE_URL}/api/seats/${seat}/photos`), { params: Promise.resolve({ seatId: seat }) });
  return { status: res.status, body: await bodyOf(res) };
};
const image = (photoId: string) => photoRoute.GET(new NextRequest(`${BASE_URL}/api/photos/${photoId}`), { params: Promise.resolve({ photoId }) });

/** A JPEG-headed body with a pattern after it, so a truncated or shifted copy shows. */
const jpeg = concat(jpegHead, Uint8Array.from({ length: 5000 }, (_, i) => (i * 13) & 0xff));

describe("seat photos", () => {
  it("refuses anonymous callers, another technician's job and an admin, storing nothing", async () => {
    signInAs(null);
    expect((await post(jpeg)).status).toBe(401);
    signInAs("dov@millrace.example");
    expect((await post(jpeg)).status).toBe(403);
    signInAs("admin@millrace.example");
    expect((await post(jpeg)).status).toBe(403);
    expect(storedFiles()).toEqual([]);
    expect(await db().select().from(seatPhotos)).toEqual([]);
  });

  it("keeps JPEG, PNG and WebP under the type read from their bytes, lists them and serves them back", async () => {
    signInAs("ines@millrace.example");
    const res = await post(jpeg, { "content-type": "image/png" });
    expect(res.status).toBe(201);
    const photo = await bodyOf(res);
    expect(photo).toMatchObject({ type: "image/jpeg", bytes: jpeg.length, takenBy: "Ines Marlow", url: `/api/photos/${photo.id}` });
    expect((await post(concat(pngHead, new Uint8Array(100)))).status).toBe(201);
    expect((await post(concat(webpHead, new Uint8Array(100)))).status).toBe(201);

    const served = await image(String(photo.id));
    expect(served.status).toBe(200);
    expect(served.headers.get("content-type")).toBe("image/jpeg");
    expect(served.headers.get("x-content-type-options")).toBe("nosniff");
    expect(new Uint8Array(await served.arrayBuffer())).toEqual(jpeg);

    // Anyone of the shop who reads jobs sees them, here the admin.
    signInAs("admin@millrace.example");
    const listed = await list();
    expect(listed.status).toBe(200);
    expect((listed.body.photos as Array<{ type: string }>).map((p) => p.type)).toEqual(["image/jpeg", "image/png", "image/webp"]);
    expect(storedFiles()).toHaveLength(3);
    expect(await auditFor(db(), seat, "seat.photo_added")).toHaveLength(3);
  });

  it("refuses HEIC, audio and text with 415, an empty body with 400, and an oversized one with 413", async () => {
    signInAs("ines@millrace.example");
    const heic = await post(heicHead, { "content-type": "image/heic" });
    expect(heic.status).toBe(415);
    expect(await bodyOf(heic)).toMatchObject({ error: "unsupported_media_type", message: expect.stringMatching(/JPEG/) });
    expect((await post(ebmlHeader(), { "content-type": "image/jpeg" })).status).toBe(415);
    expect((await post(new TextEncoder().encode("<svg xmlns='http://www.w3.org/2000/svg'/>"), { "content-type": "image/jpeg" })).status).toBe(415);
    expect((await post(new Uint8Array(0))).status).toBe(400);
    // Declared over the 10 MB limit: refused before reading.
    expect((await post(jpeg, { "content-length": String(10 * 1024 * 1024 + 1) })).status).toBe(413);
    // Undeclared and one byte over 10 MB, streamed in 1 MB pieces.
    let sent = 0;
    const first = concat(jpegHead, new Uint8Array(1024 * 1024 - jpegHead.length));
    const stream = new ReadableStream<Uint8Array>({
      pull(c) {
        if (sent > 10) return c.close();
        c.enqueue(sent === 0 ? first : sent === 10 ? new Uint8Array(1) : new Uint8Array(1024 * 1024));
        sent++;
      },
    });
    const big = await post(stream);
    expect(big.status).toBe(413);
    expect(await bodyOf(big)).toMatchObject({ error: "too_large", message: expect.stringMatching(/10 MB/) });
    expect(storedFiles()).toHaveLength(3);
    expect(fs.readdirSync(photosDir()).filter((f) => f.includes(".part-"))).toEqual([]);
    expect(await db().select().from(seatPhotos).where(eq(seatPhotos.seatId, seat))).toHaveLength(3);
  });

  it("refuses photos on a signed-off seat or job with 409", async () => {
    signInAs("ines@millrace.example");
    await setSeatState(db(), seat, "approved");
    expect((await post(jpeg)).status).toBe(409);
    await setSeatState(db(), seat, "lapping");
    await setJob(db(), "MHW-0141", { status: "signed_off" });
    const res = await post(jpeg);
    expect(res.status).toBe(409);
    expect(await bodyOf(res)).toMatchObject({ message: expect.stringMatching(/MHW-0141 is signed off/) });
    await setJob(db(), "MHW-0141", { status: "at_bench" });
    expect(storedFiles()).toHaveLength(3);
  });

  it("hides another shop's or a missing photo behind 404", async () => {
    signInAs("ines@millrace.example");
    expect((await image("00000000-0000-4000-8000-000000000000")).status).toBe(404);
    expect((await image("not-a-uuid")).status).toBe(400);
    expect((await post(jpeg, {}, "00000000-0000-4000-8000-000000000000")).status).toBe(404);
  });
});
