import type { Route } from "./+types/api.rigs.photos";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, issuesOf } from "~/lib/http";
import { startPhotoSweeper } from "~/photos/cleanup.server";
import { mayAddPhoto, mayKeepLocation } from "~/photos/permissions";
import { PhotoInputError, readBodyWithLimit } from "~/photos/process.server";
import { storePhoto } from "~/photos/upload.server";
import { assertPhotoTarget, listPhotos, PhotoTargetError } from "~/repos/photos.server";
import { keepsLocation, photoListQuery, photoUploadQuery, uploadTargetOf } from "~/schemas/photos";
import { getPhotoStore } from "~/storage/photo-store.server";

const noStore = { "cache-control": "private, no-store" };
function queryOf(request: Request) {
  return Object.fromEntries(new URL(request.url).searchParams);
}

/** GET /api/rigs/:rigId/photos[?partId=|place=|readingId=] — the rig's photos (any member). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const parsed = photoListQuery.safeParse(queryOf(request));
  if (!parsed.success) return apiError(400, "invalid_query", "The photo filter does not have the expected shape.", issuesOf(parsed.error));
  const photos = await listPhotos(db, access.rig.id, parsed.data);
  const store = getPhotoStore();
  if (store) startPhotoSweeper(db, store);
  return Response.json({ photos, me: { userId: access.user.id, role: access.role }, available: store !== null }, { headers: noStore });
}

/**
 * POST /api/rigs/:rigId/photos?partId=…&place=…|readingId=…&caption=…&keepLocation=1 — one
 * picture as the raw request body (JPEG, PNG or WebP by content; 15 MB at most). Owners add to
 * parts and places, crew and owners to readings. 201 with the photo.
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "GET, POST" });
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "crew", db);
  const parsed = photoUploadQuery.safeParse(queryOf(request));
  if (!parsed.success) return apiError(400, "invalid_target", parsed.error.issues[0]?.message ?? "Bad photo target.", issuesOf(parsed.error));
  const q = parsed.data;
  const target = uploadTargetOf(q);
  if (!mayAddPhoto(access.role, target.kind)) {
    return apiError(403, "forbidden", "Only the rig's owners add photos to the model; crew can add photos to logbook readings.");
  }
  const keepLocation = keepsLocation(q);
  if (keepLocation && !mayKeepLocation(access.role)) {
    return apiError(403, "forbidden", "Only the rig's owners can keep a photo's location.");
  }
  const store = getPhotoStore();
  if (!store) return apiError(503, "photos_unavailable", "Photos are not set up on this server.");
  startPhotoSweeper(db, store);
  try {
    await assertPhotoTarget(db, access.rig.id, target);
    const bytes = await readBodyWithLimit(request);
    const photo = await storePhoto(db, store, {
      rigId: access.rig.id,
      authorId: access.user.id,
      target,
      caption: q.caption,
      keepLocation,
      bytes,
    });
    return Response.json({ photo }, { status: 201, headers: noStore });
  } catch (error) {
    if (error instanceof PhotoInputError) return apiError(error.status, error.code, error.message);
    if (error instanceof PhotoTargetError) {
      return error.code === "unknown_reading" ? apiError(404, error.code, error.message) : apiError(400, error.code, error.message);
    }
    throw error;
  }
});
