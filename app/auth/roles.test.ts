import { describe, expect, test } from "vitest";
import { cableUnit, lengthUnit, rigRole, socSource, temperatureUnit } from "~/db/schema";
import { preferencesSchema } from "~/schemas/account";
import { socSourceSchema } from "~/schemas/rig-state";
import { hasRole, rigRoles, roleSchema } from "./roles";

describe("Roles on a rig", () => {
  test("an owner may do what crew may, crew what a guest may, and never the other way", () => {
    expect(hasRole("owner", "crew")).toBe(true);
    expect(hasRole("crew", "guest")).toBe(true);
    expect(hasRole("crew", "crew")).toBe(true);
    expect(hasRole("guest", "crew")).toBe(false);
    expect(hasRole("crew", "owner")).toBe(false);
    expect(hasRole(null, "guest")).toBe(false);
  });

  test("the form, the protocol and the database accept the same three roles and nothing else", () => {
    expect(rigRole.enumValues).toEqual([...rigRoles]);
    expect(rigRoles).toEqual(["owner", "crew", "guest"]);
    expect(roleSchema.options).toEqual(rigRole.enumValues);
    expect(roleSchema.safeParse("captain").success).toBe(false);
  });
});

describe("Enumerations declared once", () => {
  test("the SoC source the API accepts is the database's list", () => {
    expect(socSourceSchema.options).toEqual(socSource.enumValues);
    expect(socSource.enumValues).toEqual(["entered", "resting_voltage", "logbook"]);
  });

  test("the units the account form accepts are the database's lists", () => {
    expect(preferencesSchema.shape.lengthUnit.options).toEqual(lengthUnit.enumValues);
    expect(preferencesSchema.shape.cableUnit.options).toEqual(cableUnit.enumValues);
    expect(preferencesSchema.shape.temperatureUnit.options).toEqual(temperatureUnit.enumValues);
  });
});
