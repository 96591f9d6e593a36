/**
 * The rig's as-built model, read and checked in one place. Stored documents pass through the
 * engine's `validateModel` (which migrates an older `schemaVersion` first), so no route sees a
 * document the engine would refuse.
 */
import type { Db } from "~/db/db.server";
import { validateModel, type RigModel } from "~/engine/model";
import { apiError } from "~/lib/http";
import { getAsBuilt } from "./rigs.server";

export type AsBuiltModel = { branchId: string; revision: number; savedAt: Date; model: RigModel };

export const MODEL_UNREADABLE = "This rig's model could not be read.";

/** The as-built head, migrated and validated; null when the rig has none or it does not validate. */
export async function getAsBuiltModel(db: Db, rigId: string): Promise<AsBuiltModel | null> {
  const asBuilt = await getAsBuilt(db, rigId);
  if (!asBuilt) return null;
  const checked = validateModel(asBuilt.document);
  if (!checked.ok) return null;
  return { branchId: asBuilt.branchId, revision: asBuilt.revision, savedAt: asBuilt.savedAt, model: checked.model };
}

/**
 * The as-built head, migrated and validated, or a thrown 500 `model_unreadable` (a stored
 * document the engine refuses is the server's fault, never the person's).
 */
export async function requireAsBuiltModel(db: Db, rigId: string): Promise<AsBuiltModel> {
  const found = await getAsBuiltModel(db, rigId);
  if (!found) throw apiError(500, "model_unreadable", MODEL_UNREADABLE);
  return found;
}
