// Builders for sync tests: invented Juniper readings and the changes that carry them.
import { users, rigMembers } from "~/db/schema";
import type { Db } from "~/db/db.server";
import { createRig } from "~/repos/rigs.server";
import type { Change } from "~/schemas/sync";
import { juniperModel } from "../fixtures/juniper";

export async function juniperCrew(db: Db) {
  const tag = crypto.randomUUID().slice(0, 8);
  const people = await db
    .insert(users)
    .values([
      { email: `ada-${tag}@juniper.example`, name: "Ada" },
      { email: `sam-${tag}@juniper.example`, name: "Sam" },
      { email: `noor-${tag}@juniper.example`, name: "Noor" },
    ])
    .returning();
  const [ada, sam, noor] = people as [typeof people[number], typeof people[number], typeof people[number]];
  const { rig, branch } = await createRig(db, { name: `Juniper ${tag}`, ownerId: ada.id, document: juniperModel });
  await db.insert(rigMembers).values([
    { rigId: rig.id, userId: sam.id, role: "crew" },
    { rigId: rig.id, userId: noor.id, role: "guest" },
  ]);
  return { rig, branch, ada, sam, noor };
}

/** An evening on the Juniper house bank: 13.2 V falling, discharging, SoC dropping. */
export function juniperReading(i: number, start = Date.UTC(2025, 9, 12, 1, 0)) {
  return {
    id: crypto.randomUUID(),
    takenAt: new Date(start + i * 5 * 60_000).toISOString(),
    bankVoltageV: Math.round((13.25 - (i % 288) * 0.001) * 1000) / 1000,
    currentA: -4.2,
    socPct: Math.max(20, 92 - (i % 288) * 0.1),
    temperatureC: 14,
    solarWhToday: 0,
    note: "",
    source: "hand" as const,
  };
}

export function addChange(rigId: string, reading: ReturnType<typeof juniperReading>): Change {
  return { id: crypto.randomUUID(), kind: "reading.add", rigId, clientTime: new Date().toISOString(), payload: { reading } };
}

export function change(rigId: string, kind: string, payload: unknown): Change {
  return { id: crypto.randomUUID(), kind, rigId, clientTime: new Date().toISOString(), payload };
}
