import { describe, expect, it } from "vitest";
import { z } from "zod";
import { juniperModel } from "../../tests/fixtures/juniper";
import { migrateModel, rigModelSchema, SCHEMA_VERSION, validateModel } from "./model";

const clone = <T>(v: T): T => structuredClone(v);

describe("rig model document", () => {
  it("Juniper validates", () => {
    const r = validateModel(juniperModel);
    if (!r.ok) console.log(r.issues);
    expect(r.ok).toBe(true);
  });

  it("converts to JSON Schema without throwing", () => {
    const js = z.toJSONSchema(rigModelSchema) as { properties?: Record<string, unknown> };
    expect(js.properties).toHaveProperty("banks");
    expect(js.properties).toHaveProperty("circuits");
  });

  it("rejects a schema error with its path", () => {
    const doc = clone(juniperModel) as unknown as { banks: { ratedAh: unknown }[] };
    doc.banks[0]!.ratedAh = -5;
    const r = validateModel(doc);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0]!.path).toEqual(["banks", 0, "ratedAh"]);
  });

  it("names unknown ids", () => {
    const doc = clone(juniperModel);
    doc.circuits[0]!.protectionId = "nope";
    doc.modes[0]!.loads.push({ loadId: "ghost", hoursPerDay: 1 });
    const r = validateModel(doc);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues.map((i) => i.message).join("\n")).toMatch(/unknown protection "nope"/);
      expect(r.issues.map((i) => i.message).join("\n")).toMatch(/unknown load "ghost"/);
    }
  });

  it("names the parts of a wiring loop", () => {
    const doc = clone(juniperModel);
    doc.circuits.push({
      id: "loop", name: "Loop back", from: { kind: "bus", id: "fuse-panel" }, to: { kind: "bus", id: "house-bus" },
      switches: [], criticality: "normal",
    });
    const r = validateModel(doc);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.find((i) => i.message.startsWith("Wiring loop"))?.message).toMatch(/House bus → Fuse panel → House bus/);
  });

  it("names a load fed by nothing", () => {
    const doc = clone(juniperModel);
    doc.circuits = doc.circuits.filter((c) => c.id !== "c-fridge");
    const r = validateModel(doc);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues).toContainEqual({ path: ["loads", 0], message: "Compressor fridge is fed by no bank or charge source" });
  });

  it("never throws on junk", () => {
    for (const junk of [null, 3, "x", [], {}, { schemaVersion: 1 }, { schemaVersion: 99 }]) {
      const r = validateModel(junk);
      expect(r.ok).toBe(false);
    }
  });

  it("migrates an unversioned document", () => {
    const old = clone(juniperModel) as unknown as Record<string, unknown>;
    delete old.schemaVersion;
    const banks = old.banks as Record<string, unknown>[];
    for (const b of banks) {
      b.nominalV = b.batteryNominalV;
      delete b.batteryNominalV;
      delete b.seriesCount;
    }
    const m = migrateModel(old) as { schemaVersion: number; banks: { batteryNominalV: number; seriesCount: number }[] };
    expect(m.schemaVersion).toBe(SCHEMA_VERSION);
    expect(m.banks[0]!.batteryNominalV).toBe(12.8);
    expect(m.banks[0]!.seriesCount).toBe(1);
    expect(validateModel(old).ok).toBe(true);
  });
});
