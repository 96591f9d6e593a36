// One-off: rewrites every stored rig model document older than the engine's schema version
// (model_revisions) to the current version, in place, in one transaction. Reading already
// migrates on the fly (validateModel → migrateModel), so this only saves the work and lets
// exports carry the new version. Revisions are otherwise append-only: this is the one
// sanctioned exception, and it changes no figure (see app/engine/migration.test.ts).
//   DATABASE_URL=postgres://… node --import tsx scripts/migrate-models.ts [--dry-run]
import { eq, lt } from "drizzle-orm";
import { createDb } from "../app/db/db.server";
import { modelRevisions } from "../app/db/schema";
import { getEnv } from "../app/env.server";
import { SCHEMA_VERSION, validateModel } from "../app/engine/model";

const dryRun = process.argv.includes("--dry-run");
const { db, pool } = createDb(getEnv().DATABASE_URL, 1);
try {
  const result = await db.transaction(async (tx) => {
    const old = await tx.select({ id: modelRevisions.id, schemaVersion: modelRevisions.schemaVersion, document: modelRevisions.document })
      .from(modelRevisions).where(lt(modelRevisions.schemaVersion, SCHEMA_VERSION)).for("update");
    let migrated = 0;
    const failed: { id: number; message: string }[] = [];
    for (const row of old) {
      const v = validateModel(row.document);
      if (!v.ok) {
        failed.push({ id: row.id, message: v.issues.slice(0, 3).map((i) => `${i.path.join(".")}: ${i.message}`).join("; ") });
        continue;
      }
      if (!dryRun) await tx.update(modelRevisions).set({ document: v.model, schemaVersion: SCHEMA_VERSION }).where(eq(modelRevisions.id, row.id));
      migrated++;
    }
    return { found: old.length, migrated, failed };
  });
  console.log(`[tilldawn] Model revisions below version ${SCHEMA_VERSION}: ${result.found}; ${dryRun ? "would migrate" : "migrated"} ${result.migrated}; left as they are (invalid): ${result.failed.length}`);
  for (const f of result.failed) console.log(`  revision row ${f.id}: ${f.message}`);
  if (result.failed.length) process.exitCode = 2;
} catch (error) {
  console.error(`[tilldawn] Model migration failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
