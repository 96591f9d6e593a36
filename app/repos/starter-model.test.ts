import { describe, expect, test } from "vitest";
import { validateModel } from "~/engine/model";
import { starterModel } from "./starter-model";

describe("A new rig's starter model", () => {
  test("passes the engine's validation with one bank, one bus, no loads and one mode", () => {
    const model = starterModel({ name: "Kestrel" });
    const checked = validateModel(model);
    expect(checked.ok ? [] : checked.issues).toEqual([]);
    expect(model.banks).toHaveLength(1);
    expect(model.buses).toHaveLength(1);
    expect(model.loads).toHaveLength(0);
    expect(model.modes).toHaveLength(1);
    expect(model.name).toBe("Kestrel");
  });

  test("keeps the time zone and home position it is given, through the engine's validation", () => {
    const checked = validateModel(starterModel({ name: "Tern", timeZone: "Europe/Lisbon", latDeg: 38.7, lonDeg: -9.1 }));
    if (!checked.ok) throw new Error(JSON.stringify(checked.issues));
    expect(checked.model.timeZone).toBe("Europe/Lisbon");
    expect(checked.model.home).toEqual({ latDeg: 38.7, lonDeg: -9.1 });
  });

  test("starts in UTC at 0°, 0° when no time zone or home is given", () => {
    const model = starterModel({ name: "Kestrel" });
    expect(model.timeZone).toBe("UTC");
    expect(model.home).toEqual({ latDeg: 0, lonDeg: 0 });
  });
});
