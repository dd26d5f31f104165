// A seat's photos of its contact ring: the bench screen posts the camera's image as the body;
// the review page and the report list them.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { parseId } from "@/lib/http";
import { declaredBody } from "@/lib/storage/intact";
import { addSeatPhoto, listSeatPhotos, MAX_PHOTO_BYTES, tooLargePhoto } from "@/lib/storage/photos";

type Ctx = { params: Promise<{ seatId: string }> };

/** Stores one photo (JPEG, PNG or WebP, read from its bytes) of the seat. */
export const POST = guardedRoute("jobs:work", async (req, ctx: Ctx, actor) => {
  const id = parseId((await ctx.params).seatId, "seatId");
  const declared = declaredBody(req.headers);
  // Refused before the body is read: a declared size over the limit will not fit.
  if ((declared.bytes ?? 0) > MAX_PHOTO_BYTES) throw tooLargePhoto();
  const photo = await addSeatPhoto(await getDb(), actor, id, req.body, declared);
  return NextResponse.json(photo, { status: 201 });
});

export const GET = guardedRoute("jobs:read", async (_req, ctx: Ctx, actor) => {
  const id = parseId((await ctx.params).seatId, "seatId");
  return NextResponse.json({ photos: await listSeatPhotos(await getDb(), actor, id) });
});
