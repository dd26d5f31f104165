// One seat photo's image, for anyone in its shop who may read jobs.
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { NotFoundError } from "@/lib/errors";
import { parseId } from "@/lib/http";
import { blobStore } from "@/lib/storage";
import { getPhoto } from "@/lib/storage/photos";

export const GET = guardedRoute("jobs:read", async (_req, ctx: { params: Promise<{ photoId: string }> }, actor) => {
  const id = parseId((await ctx.params).photoId, "photoId");
  const photo = await getPhoto(await getDb(), actor, id);
  const body = await blobStore().get(photo.key);
  if (!body) throw new NotFoundError("That photo's image is no longer kept.");
  return new Response(body, {
    status: 200,
    headers: {
      "content-type": photo.type,
      "content-length": String(photo.bytes),
      // Each photo has its own id and is never replaced, so the browser may keep it.
      "cache-control": "private, max-age=31536000, immutable",
      // The type was read from the bytes; the browser must not guess another.
      "x-content-type-options": "nosniff",
    },
  });
});
