// Seeds the demo rig "Juniper" with its owner, crew and guest, only when the database has no rig.
import { count } from "drizzle-orm";
import { createDb } from "../app/db/db.server";
import { rigMembers, rigs, users } from "../app/db/schema";
import { getEnv } from "../app/env.server";
import { validateModel } from "../app/engine/model";
import { createRig } from "../app/repos/rigs.server";
import { demoPeople } from "../tests/fixtures/demo";
import { juniperModel } from "../tests/fixtures/juniper";
import { seedDemoPhotos } from "./seed-photos";

const { db, pool } = createDb(getEnv().DATABASE_URL, 1);
try {
  const [existing] = await db.select({ n: count() }).from(rigs);
  if ((existing?.n ?? 0) > 0) {
    console.log(`[tilldawn] Database has ${existing?.n} rig(s); demo seed skipped`);
  } else {
    const checked = validateModel(juniperModel);
    if (!checked.ok) throw new Error(`demo model is invalid: ${JSON.stringify(checked.issues)}`);
    const people = await db
      .insert(users)
      .values(demoPeople.map(({ email, name }) => ({ email, name })))
      .onConflictDoNothing()
      .returning();
    const byEmail = new Map(people.map((u) => [u.email, u.id]));
    const owner = byEmail.get(demoPeople[0].email) ?? null;
    const { rig } = await createRig(db, { name: checked.model.name, ownerId: owner, document: checked.model, message: "Demo rig" });
    const others = demoPeople.slice(1).flatMap((p) => {
      const userId = byEmail.get(p.email);
      return userId ? [{ rigId: rig.id, userId, role: p.role }] : [];
    });
    if (others.length) await db.insert(rigMembers).values(others);
    console.log(`[tilldawn] Seeded the demo rig "${rig.name}" with ${people.length} people`);
  }
  // Demo photos: when Juniper has none yet and the photo store answers (scripts/seed-photos.ts).
  await seedDemoPhotos(db);
} catch (error) {
  console.error(`[tilldawn] Seeding failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
