import { count, eq } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { sessions, userPreferences, users } from "~/db/schema";
import type { Preferences } from "~/schemas/account";

export async function setName(db: Db, userId: string, name: string) {
  await db.update(users).set({ name }).where(eq(users.id, userId));
}

export async function savePreferences(db: Db, userId: string, prefs: Preferences) {
  await db
    .insert(userPreferences)
    .values({ userId, ...prefs })
    .onConflictDoUpdate({ target: userPreferences.userId, set: { ...prefs, updatedAt: new Date() } });
}

/** How many browsers and devices the person is signed in on (at least the one asking). */
export async function countSessions(db: Db, userId: string): Promise<number> {
  const [row] = await db.select({ n: count() }).from(sessions).where(eq(sessions.userId, userId));
  return Math.max(row?.n ?? 0, 1);
}
