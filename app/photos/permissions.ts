/**
 * Who may do what with photos (PRODUCT.md roles): everyone on the rig sees them; only owners
 * add or delete photos of the model's parts and places; crew (and owners) add photos to
 * logbook readings, and delete those they added; owners delete any. Shared by server and UI.
 */
import { hasRole, type Role } from "~/auth/roles";

export type PhotoKind = "part" | "reading";

export function mayAddPhoto(role: Role | null | undefined, kind: PhotoKind): boolean {
  return kind === "part" ? hasRole(role, "owner") : hasRole(role, "crew");
}

export function mayDeletePhoto(
  role: Role | null | undefined,
  photo: { readingId: string | null; authorId: string | null },
  userId: string | null | undefined,
): boolean {
  if (hasRole(role, "owner")) return true;
  return photo.readingId !== null && hasRole(role, "crew") && photo.authorId !== null && photo.authorId === userId;
}

/** Only an owner may keep a picture's EXIF location. */
export function mayKeepLocation(role: Role | null | undefined): boolean {
  return hasRole(role, "owner");
}
