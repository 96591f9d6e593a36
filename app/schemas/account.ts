/**
 * A person's own settings: the name their crew sees and their display preferences. The unit
 * lists feed both the database enums (`app/db/schema.ts`) and the account form.
 */
import { z } from "zod";

export const lengthUnits = ["metric", "imperial"] as const;
export const cableUnits = ["awg", "mm2"] as const;
export const temperatureUnits = ["c", "f"] as const;
/** Times on a 24-hour or a 12-hour clock (`app/lib/datetime.ts` formats with it). */
export const clocks = ["24h", "12h"] as const;

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
  clock: z.enum(clocks, { error: "Choose a 24-hour or a 12-hour clock." }),
});
export type Preferences = z.infer<typeof preferencesSchema>;

/** What a person who has never saved preferences sees (the database column defaults too). */
export const defaultPreferences: Preferences = {
  lengthUnit: "metric",
  cableUnit: "mm2",
  temperatureUnit: "c",
  nightDefault: false,
  clock: "24h",
};

/**
 * An e-mail address as people type it (trimmed, lower-cased). Used by the invitation form and
 * by signing in (`app/auth/sign-in.server.ts`).
 */
export const emailSchema = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .min(1, "Enter your e-mail address.")
  .max(254, "That address is too long.")
  .pipe(z.email({ error: "That does not look like an e-mail address. Check it and try again." }))
  .transform((s) => s.toLowerCase());

/** The account page's forms, one per `intent`. */
export const ACCOUNT_INTENT = {
  profile: "profile",
  preferences: "preferences",
  signOutEverywhere: "sign-out-everywhere",
  delete: "delete",
} as const;

export const profileFormSchema = z.object({ name: nameSchema });

/** A checkbox sends "on" or nothing: nothing is false. */
export const preferencesFormSchema = preferencesSchema.extend({ nightDefault: z.boolean().default(false) });

export const deleteAccountFormSchema = z.object({
  confirm: z.boolean({ error: "Tick the box to confirm that you want to delete your account." }),
  /** The rigs the person saw listed when they confirmed (comma-separated ids). */
  rigIds: z
    .string()
    .default("")
    .transform((s) => s.split(",").filter(Boolean)),
});
