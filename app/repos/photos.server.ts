/**
 * Photo rows. A row is written only after both of its objects are in the store, in a
 * transaction that first checks the target belongs to the rig: the part id must be in the head
 * revision of one of the rig's model branches (the branch rows are locked FOR SHARE, so a model
 * save cannot remove the part in between), the reading must be one of the rig's live readings.
 */
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { modelBranches, modelRevisions, photos, readings, users } from "~/db/schema";
import { modelParts } from "~/photos/parts";
import type { PhotoView } from "~/photos/types";

export type { PhotoView };

export type PhotoRow = typeof photos.$inferSelect;

export type PhotoTarget = { kind: "part"; partId: string | null; place: string } | { kind: "reading"; readingId: string };

export class PhotoTargetError extends Error {
  override name = "PhotoTargetError";
  constructor(
    readonly code: "unknown_part" | "unknown_reading",
    message: string,
  ) {
    super(message);
  }
}

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Throws PhotoTargetError unless the target belongs to the rig; answers the part's kind. */
async function checkTarget(tx: Tx, rigId: string, target: PhotoTarget): Promise<string | null> {
  if (target.kind === "reading") {
    const [row] = await tx
      .select({ id: readings.id })
      .from(readings)
      .where(and(eq(readings.id, target.readingId), eq(readings.rigId, rigId), isNull(readings.deletedAt)))
      .for("share");
    if (!row) throw new PhotoTargetError("unknown_reading", "There is no such reading in this rig's logbook (a reading saved on a phone must sync first).");
    return null;
  }
  if (target.partId === null) return null;
  // Lock the rig's branches so no save moves a head while this photo is written.
  const branches = await tx
    .select({ id: modelBranches.id, head: modelBranches.headRevision })
    .from(modelBranches)
    .where(eq(modelBranches.rigId, rigId))
    .for("share");
  for (const branch of branches) {
    const [revision] = await tx
      .select({ document: modelRevisions.document })
      .from(modelRevisions)
      .where(and(eq(modelRevisions.branchId, branch.id), eq(modelRevisions.revision, branch.head)));
    const part = modelParts(revision?.document).find((p) => p.id === target.partId);
    if (part) return part.kind;
  }
  throw new PhotoTargetError("unknown_part", `There is no part "${target.partId}" in this rig's model.`);
}

/** Checks the target without writing (to refuse early, before the picture is processed). */
export async function assertPhotoTarget(db: Db, rigId: string, target: PhotoTarget): Promise<void> {
  await db.transaction((tx) => checkTarget(tx, rigId, target).then(() => undefined));
}

export async function insertPhoto(
  db: Db,
  input: {
    id: string;
    rigId: string;
    target: PhotoTarget;
    caption: string;
    mime: string;
    bytes: number;
    width: number;
    height: number;
    objectKey: string;
    thumbKey: string;
    keptLocation: boolean;
    authorId: string | null;
  },
): Promise<PhotoRow> {
  return db.transaction(async (tx) => {
    const partKind = await checkTarget(tx, input.rigId, input.target);
    const { target, ...rest } = input;
    const [row] = await tx
      .insert(photos)
      .values({
        ...rest,
        partId: target.kind === "part" ? target.partId : null,
        partKind,
        place: target.kind === "part" ? target.place : "",
        readingId: target.kind === "reading" ? target.readingId : null,
      })
      .returning();
    if (!row) throw new Error("photo insert returned nothing");
    return row;
  });
}

export function toPhotoView(row: PhotoRow & { authorName?: string | null }): PhotoView {
  const base = `/api/rigs/${row.rigId}/photos/${row.id}`;
  return {
    id: row.id,
    partId: row.partId,
    partKind: row.partKind,
    place: row.place,
    readingId: row.readingId,
    caption: row.caption,
    mime: row.mime,
    bytes: row.bytes,
    width: row.width,
    height: row.height,
    keptLocation: row.keptLocation,
    authorId: row.authorId,
    authorName: row.authorName ?? null,
    createdAt: row.createdAt.toISOString(),
    thumbUrl: `${base}?size=thumb`,
    url: base,
  };
}

export type PhotoFilter = { partId?: string; readingId?: string; place?: string };

/** The rig's photos, newest first, optionally only those of one part, place or reading. */
export async function listPhotos(db: Db, rigId: string, filter: PhotoFilter = {}): Promise<PhotoView[]> {
  const where = [eq(photos.rigId, rigId)];
  if (filter.partId) where.push(eq(photos.partId, filter.partId));
  if (filter.readingId) where.push(eq(photos.readingId, filter.readingId));
  if (filter.place) where.push(sql`lower(${photos.place}) = lower(${filter.place})`);
  const rows = await db
    .select({ photo: photos, authorName: users.name })
    .from(photos)
    .leftJoin(users, eq(users.id, photos.authorId))
    .where(and(...where))
    .orderBy(desc(photos.createdAt), asc(photos.id));
  return rows.map((r) => toPhotoView({ ...r.photo, authorName: r.authorName }));
}

export async function getPhoto(db: Db, rigId: string, photoId: string): Promise<PhotoRow | null> {
  const [row] = await db.select().from(photos).where(and(eq(photos.id, photoId), eq(photos.rigId, rigId)));
  return row ?? null;
}

/** Deletes the row (the caller then deletes its objects). Returns the row, or null if gone. */
export async function deletePhotoRow(db: Db, rigId: string, photoId: string): Promise<PhotoRow | null> {
  const [row] = await db.delete(photos).where(and(eq(photos.id, photoId), eq(photos.rigId, rigId))).returning();
  return row ?? null;
}

/** Every photo id that has a row (for the orphan sweep), limited to the given ids. */
export async function existingPhotoIds(db: Db, ids: string[]): Promise<Set<string>> {
  if (!ids.length) return new Set();
  const rows = await db.select({ id: photos.id }).from(photos).where(inArray(photos.id, ids));
  return new Set(rows.map((r) => r.id));
}
