import type { Route } from "./+types/api.rigs.photos.$photoId";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, readIntentField } from "~/lib/http";
import { isUuid } from "~/lib/ids";
import { mayDeletePhoto } from "~/photos/permissions";
import { removePhoto } from "~/photos/upload.server";
import { getPhoto } from "~/repos/photos.server";
import { getPhotoStore } from "~/storage/photo-store.server";

const noSuchPhoto = () => apiError(404, "not_found", "There is no such photo on this rig.");

/** GET /api/rigs/:rigId/photos/:photoId[?size=thumb] — the picture (any member). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  if (!isUuid(params.photoId)) return noSuchPhoto();
  const row = await getPhoto(db, access.rig.id, params.photoId);
  if (!row) return noSuchPhoto();
  const store = getPhotoStore();
  if (!store) return apiError(503, "photos_unavailable", "Photos are not set up on this server.");
  const thumb = new URL(request.url).searchParams.get("size") === "thumb";
  const object = await store.get(thumb ? row.thumbKey : row.objectKey);
  if (!object) return apiError(404, "not_found", "This photo's picture is missing from the store.");
  const headers = new Headers({
    "content-type": thumb ? "image/webp" : row.mime,
    // A photo id never gets another picture: cache it for good, but only in this person's browser.
    "cache-control": "private, max-age=31536000, immutable",
    "x-content-type-options": "nosniff",
    "content-disposition": "inline",
  });
  if (object.length !== null) headers.set("content-length", String(object.length));
  return new Response(object.stream, { status: 200, headers });
}

/**
 * DELETE /api/rigs/:rigId/photos/:photoId (or POST with intent=delete) — removes the row, then
 * the picture and thumbnail. Owners delete any photo; crew delete photos they added to readings.
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  const method = request.method.toUpperCase();
  if (method !== "DELETE" && method !== "POST") {
    return apiError(405, "method_not_allowed", "Use DELETE (or POST with intent=delete).", undefined, { allow: "GET, POST, DELETE" });
  }
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "crew", db);
  if (method === "POST") {
    const intent = await readIntentField(request);
    if (intent !== "delete") return apiError(400, "invalid_intent", "Send intent=delete to delete this photo.");
  }
  if (!isUuid(params.photoId)) return noSuchPhoto();
  const row = await getPhoto(db, access.rig.id, params.photoId);
  if (!row) return noSuchPhoto();
  if (!mayDeletePhoto(access.role, row, access.user.id)) {
    return apiError(
      403,
      "forbidden",
      row.readingId ? "Only an owner or the person who added this photo can delete it." : "Only the rig's owners delete photos of the model.",
    );
  }
  const store = getPhotoStore();
  if (!store) return apiError(503, "photos_unavailable", "Photos are not set up on this server.");
  const removed = await removePhoto(db, store, access.rig.id, row.id);
  if (!removed) return noSuchPhoto();
  return Response.json({ deleted: row.id }, { headers: { "cache-control": "private, no-store" } });
});
