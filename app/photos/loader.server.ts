/**
 * Loader helpers for pages that show photos at a part (the photos page now; the circuit map
 * and the editor later):
 *
 *   const photos = await loadPartPhotos(db, access, "fuse-panel");
 *   return { ..., photos };            // then <PhotoStrip {...photos} rigId=… target={{ partId }} />
 *
 * Each answers the PhotoStrip's props: the photos and what this person may do with them.
 */
import type { RigAccess } from "~/auth/guards.server";
import type { Db } from "~/db/db.server";
import { getAsBuilt } from "~/repos/rigs.server";
import { listPhotos, type PhotoView } from "~/repos/photos.server";
import { getPhotoStore } from "~/storage/photo-store.server";
import { modelParts, type ModelPart } from "./parts";

export type PhotoViewer = { userId: string; role: RigAccess["role"] };
export type PhotosPayload = { photos: PhotoView[]; me: PhotoViewer; available: boolean };

function viewerOf(access: RigAccess): PhotoViewer {
  return { userId: access.user.id, role: access.role };
}

/** The photos of one part of the model (newest first). */
export async function loadPartPhotos(db: Db, access: RigAccess, partId: string): Promise<PhotosPayload> {
  const photos = await listPhotos(db, access.rig.id, { partId });
  return { photos, me: viewerOf(access), available: getPhotoStore() !== null };
}

/** Every photo of the rig with the as-built parts, for pages that group photos by part. */
export async function loadRigPhotos(db: Db, access: RigAccess): Promise<PhotosPayload & { parts: ModelPart[]; byPart: Record<string, PhotoView[]> }> {
  const [photos, asBuilt] = await Promise.all([listPhotos(db, access.rig.id), getAsBuilt(db, access.rig.id)]);
  const byPart: Record<string, PhotoView[]> = {};
  for (const p of photos) if (p.partId) (byPart[p.partId] ??= []).push(p);
  return { photos, me: viewerOf(access), available: getPhotoStore() !== null, parts: modelParts(asBuilt?.document), byPart };
}
