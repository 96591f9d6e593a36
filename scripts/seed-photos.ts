// The demo rig's photos (drawings made in code: tests/fixtures/juniper-photos.ts), uploaded
// through the app's own photo path when "Juniper" has no photos yet. Skipped, with a message,
// when photos are off or the photo store does not answer (the rest of the seed stands).
import { and, count, eq } from "drizzle-orm";
import type { Db } from "../app/db/db.server";
import { photos, rigMembers, rigs } from "../app/db/schema";
import { storePhoto } from "../app/photos/upload.server";
import { getPhotoStore } from "../app/storage/photo-store.server";
import { juniperPhotos, renderDemoPhoto } from "../tests/fixtures/juniper-photos";

export async function seedDemoPhotos(db: Db): Promise<void> {
  const [rig] = await db.select({ id: rigs.id }).from(rigs).where(eq(rigs.name, "Juniper")).limit(1);
  if (!rig) return;
  const [existing] = await db.select({ n: count() }).from(photos).where(eq(photos.rigId, rig.id));
  if ((existing?.n ?? 0) > 0) return;
  const store = getPhotoStore();
  if (!store) {
    console.log("[tilldawn] Demo photos skipped: photos are not set up (PHOTOS_S3_BUCKET)");
    return;
  }
  const [owner] = await db
    .select({ userId: rigMembers.userId })
    .from(rigMembers)
    .where(and(eq(rigMembers.rigId, rig.id), eq(rigMembers.role, "owner")))
    .limit(1);
  try {
    for (const photo of juniperPhotos) {
      await storePhoto(db, store, {
        rigId: rig.id,
        authorId: owner?.userId ?? null,
        target: { kind: "part", partId: photo.partId, place: photo.place },
        caption: photo.caption,
        keepLocation: false,
        bytes: await renderDemoPhoto(photo),
      });
    }
    console.log(`[tilldawn] Added ${juniperPhotos.length} demo photos to "Juniper"`);
  } catch (error) {
    console.log(`[tilldawn] Demo photos skipped: the photo store did not take them (${(error as Error).message})`);
  }
}
