/**
 * A person's own settings: the name their crew sees and their display preferences. The unit
 * lists feed both the database enums (`app/db/schema.ts`) and the account form.
 */
import { z } from "zod";

export const lengthUnits = ["metric", "imperial"] as const;
export const cableUnits = ["awg", "mm2"] as const;
export const temperatureUnits = ["c", "f"] as const;

export const nameSchema = z
  .string({ error: "Enter your name." })
  .trim()
  .min(1, "Enter the name your crew knows you by.")
  .max(80, "Keep the name under 80 characters.");

export const preferencesSchema = z.object({
  lengthUnit: z.enum(lengthUnits, { error: "Choose metric or imperial." }),
  cableUnit: z.enum(cableUnits, { error: "Choose AWG or mm²." }),
  temperatureUnit: z.enum(temperatureUnits, { error: "Choose °C or °F." }),
  nightDefault: z.boolean(),
});
export type Preferences = z.infer<typeof preferencesSchema>;

/** What a person who has never saved preferences sees (the database column defaults too). */
export const defaultPreferences: Preferences = {
  lengthUnit: "metric",
  cableUnit: "mm2",
  temperatureUnit: "c",
  nightDefault: false,
};
