import { describe, expect, test } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { modelParts, singularKind } from "./parts";

describe("Model parts a photo can be attached to", () => {
  test("list names become part kinds", () => {
    expect(["banks", "buses", "switches", "protections", "circuits", "loads", "cables", "inverters"].map(singularKind)).toEqual([
      "bank", "bus", "switch", "protection", "circuit", "load", "cable", "inverter",
    ]);
  });

  test("Juniper's fuse panel, main disconnect and house bank are parts; its modes are not", () => {
    const parts = modelParts(juniperModel);
    const byId = new Map(parts.map((p) => [p.id, p]));
    expect(byId.get("fuse-panel")).toMatchObject({ kind: "bus", name: "Fuse panel" });
    expect(byId.get("sw-main")).toMatchObject({ kind: "switch", name: "Main disconnect" });
    expect(byId.get("house")).toMatchObject({ kind: "bank", name: "House bank" });
    expect(byId.get("f-fridge")?.kind).toBe("protection");
    for (const mode of juniperModel.modes) expect(byId.has(mode.id)).toBe(false);
    expect(new Set(parts.map((p) => p.id)).size).toBe(parts.length);
  });

  test("anything that is not a model document has no parts", () => {
    expect(modelParts(null)).toEqual([]);
    expect(modelParts("x")).toEqual([]);
    expect(modelParts({ banks: [{ name: "no id" }, 3, null] })).toEqual([]);
  });
});
