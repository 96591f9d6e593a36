/**
 * The Alerts page's loader and action (app/routes/rig.alerts.tsx): one's own alert choices and
 * "stop", and for owners the rig's rules and device tokens. The rules live in app/alerts/rules.ts,
 * the storage in app/repos/alerts.server.ts and app/repos/devices.server.ts.
 */
import { data } from "react-router";
import type { Route } from "./+types/rig.alerts";
import { preferencesSchema, rigRulesSchema, type RuleKind } from "~/alerts/rules";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { isUuid } from "~/lib/ids";
import { readForm } from "~/lib/http";
import { loadVapidKeys } from "~/push/vapid.server";
import { getPreferences, getRigRules, listAlertLog, savePreferences, saveRigRules, stopAlerts } from "~/repos/alerts.server";
import { createDeviceToken, listDeviceTokens, revokeDeviceToken } from "~/repos/devices.server";
import { getAsBuiltModel } from "~/repos/models.server";

/** GET /rigs/:rigId/alerts — "Warn me", one's own alert choices, the alert log (every member); rules and device tokens (owners). */
export async function alertsLoader({ request, params }: Route.LoaderArgs) {
  const { user, role, rig } = await requireRigRole(request, params.rigId, "guest");
  const db = getDb();
  const [prefs, rules, log, devices, asBuilt] = await Promise.all([
    getPreferences(db, rig.id, user.id),
    getRigRules(db, rig.id),
    listAlertLog(db, rig.id, 30),
    role === "owner" ? listDeviceTokens(db, rig.id) : Promise.resolve([]),
    role === "owner" ? getAsBuiltModel(db, rig.id) : Promise.resolve(null),
  ]);
  const modes = asBuilt ? asBuilt.model.modes.map((m) => ({ id: m.id, name: m.name })) : [];
  return {
    rig,
    role,
    publicKey: loadVapidKeys().publicKey,
    prefs: prefs ? { ...prefs, unsubscribeToken: undefined } : null,
    rules,
    modes,
    log,
    devices: devices.map((d) => ({ ...d, createdAt: d.createdAt.toISOString(), lastUsedAt: d.lastUsedAt?.toISOString() ?? null, revokedAt: d.revokedAt?.toISOString() ?? null })),
  };
}

export type AlertsAnswer = { intent: string; ok?: string; error?: string; token?: { name: string; value: string } };

const hhmm = (v: FormDataEntryValue | null): number | null => {
  const m = /^(\d{1,2}):(\d{2})$/.exec(String(v ?? ""));
  return m ? Number(m[1]) * 60 + Number(m[2]) : null;
};

export async function alertsAction({ request, params }: Route.ActionArgs) {
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const ownerIntents = ["rules", "device-create", "device-revoke"];
  const { user, rig } = await requireRigRole(request, params.rigId, ownerIntents.includes(intent) ? "owner" : "guest");
  const db = getDb();
  const fail = (message: string) => data<AlertsAnswer>({ intent, error: message }, { status: 400 });
  switch (intent) {
    case "preferences": {
      const parsed = preferencesSchema.safeParse({
        rules: form.getAll("rule").map(String),
        quietStartMin: hhmm(form.get("quietStart")),
        quietEndMin: hhmm(form.get("quietEnd")),
        timeZone: String(form.get("timeZone") || "UTC"),
        push: form.get("push") === "on",
        email: form.get("email") === "on",
      });
      if (!parsed.success) return fail(parsed.error.issues[0]?.message ?? "Check the form.");
      await savePreferences(db, rig.id, user.id, parsed.data);
      return data<AlertsAnswer>({ intent, ok: "Your alert choices are saved." });
    }
    case "stop":
      await stopAlerts(db, rig.id, user.id);
      return data<AlertsAnswer>({ intent, ok: "You will get no more alerts for this rig." });
    case "rules": {
      const n = (k: string) => (form.get(k) === "" || form.get(k) === null ? null : Number(form.get(k)));
      const on = (k: RuleKind) => form.get(`${k}.enabled`) === "on";
      const parsed = rigRulesSchema.safeParse({
        runway_low: { enabled: on("runway_low"), belowH: n("runway_low.belowH") ?? 3 },
        soc_low: { enabled: on("soc_low"), floorPct: n("soc_low.floorPct") },
        voltage_low: { enabled: on("voltage_low"), belowV: n("voltage_low.belowV") },
        no_reading: { enabled: on("no_reading"), afterH: n("no_reading.afterH") ?? 6, parkedModeIds: form.getAll("no_reading.parkedModeIds").map(String) },
        charging_stopped: { enabled: on("charging_stopped") },
        falls_short: { enabled: on("falls_short") },
      });
      if (!parsed.success) return fail(`${parsed.error.issues[0]?.path.join(" ")}: ${parsed.error.issues[0]?.message}`);
      await saveRigRules(db, rig.id, parsed.data, user.id);
      return data<AlertsAnswer>({ intent, ok: "The rig's alert rules are saved." });
    }
    case "device-create": {
      const name = String(form.get("name") ?? "").trim();
      if (name.length < 1 || name.length > 60) return fail("Give the device a name of 1 to 60 characters.");
      const created = await createDeviceToken(db, { rigId: rig.id, name, createdBy: user.id });
      return data<AlertsAnswer>({ intent, ok: `Token for ${created.name} created.`, token: { name: created.name, value: created.token } });
    }
    case "device-revoke": {
      const id = String(form.get("id") ?? "");
      if (!isUuid(id) || !(await revokeDeviceToken(db, rig.id, id))) return fail("That token is not live on this rig.");
      return data<AlertsAnswer>({ intent, ok: "The token is revoked: the device can no longer post." });
    }
    default:
      return fail("Unknown action.");
  }
}
