import { Form, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/rig.alerts";
import { RULE_KINDS, RULE_NAMES, DEFAULT_PREFERENCES, CUTOFF_RULE } from "~/alerts/rules";
import { protectedAction } from "~/auth/csrf.server";
import { WarnMe } from "~/components/alerts/warn-me";
import { Button, Card, Field, Notice } from "~/components/ui/form";
import { alertsAction, alertsLoader, type AlertsAnswer } from "./rig.alerts.server";

/** GET /rigs/:rigId/alerts — "Warn me", one's own alert choices, the alert log (every member); rules and device tokens (owners). */
export const loader = alertsLoader;

export const action = protectedAction(alertsAction);

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Alerts · ${d?.rig.name ?? "Rig"} · Tilldawn` }];
}

const minToHHMM = (m: number | null) => (m === null ? "" : `${String(Math.floor(m / 60)).padStart(2, "0")}:${String(m % 60).padStart(2, "0")}`);
const when = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short" });
const statusWords: Record<string, string> = { pending: "waiting", sending: "sending", sent: "delivered", retrying: "retrying", failed: "failed", gone: "not delivered (gone)", quiet: "held: quiet hours" };

export default function RigAlerts({ loaderData }: Route.ComponentProps) {
  const { rig, role, publicKey, prefs, rules, modes, log, devices } = loaderData;
  const answer = useActionData<typeof action>() as AlertsAnswer | undefined;
  const busy = useNavigation().state !== "idle";
  const p = prefs ?? DEFAULT_PREFERENCES;
  const result = (intent: string) =>
    answer?.intent === intent ? <Notice tone={answer.error ? "error" : "done"}>{answer.error ?? answer.ok}</Notice> : null;

  return (
    <div className="space-y-4">
      <header className="space-y-1">
        <h1 className="text-3xl font-bold">Alerts for {rig.name}</h1>
        <p className="text-night-200">Hear about a flat bank before the fridge goes warm, even with the app closed.</p>
      </header>

      <Card>
        <h2 className="text-xl font-bold">Warn me</h2>
        <WarnMe rigId={rig.id} publicKey={publicKey} warned={prefs !== null} />
      </Card>

      {prefs ? (
        <Card>
          <h2 className="text-xl font-bold">What I hear about</h2>
          <Form method="post" className="space-y-4">
            <input type="hidden" name="intent" value="preferences" />
            <fieldset className="space-y-2">
              <legend className="font-bold">Rules</legend>
              {RULE_KINDS.map((k) => (
                <label key={k} className="flex min-h-11 items-center gap-3">
                  <input type="checkbox" name="rule" value={k} defaultChecked={p.rules.includes(k)} className="size-5" />
                  {RULE_NAMES[k]}
                  {k === CUTOFF_RULE ? <span className="text-sm text-night-300">(comes even in quiet hours)</span> : null}
                </label>
              ))}
            </fieldset>
            <fieldset className="grid gap-3 sm:grid-cols-3">
              <legend className="font-bold">Quiet hours (leave empty for none)</legend>
              <Field label="From" name="quietStart" type="time" defaultValue={minToHHMM(p.quietStartMin)} />
              <Field label="Until" name="quietEnd" type="time" defaultValue={minToHHMM(p.quietEndMin)} />
              <Field label="Time zone" name="timeZone" defaultValue={p.timeZone} />
            </fieldset>
            <fieldset className="space-y-2">
              <legend className="font-bold">How</legend>
              <label className="flex min-h-11 items-center gap-3"><input type="checkbox" name="push" defaultChecked={p.push} className="size-5" />Push notification on my phones</label>
              <label className="flex min-h-11 items-center gap-3"><input type="checkbox" name="email" defaultChecked={p.email} className="size-5" />E-mail</label>
            </fieldset>
            <div className="flex flex-wrap gap-3">
              <Button type="submit" disabled={busy}>Save my choices</Button>
            </div>
            {result("preferences")}
          </Form>
          <Form method="post">
            <input type="hidden" name="intent" value="stop" />
            <Button type="submit" variant="danger" disabled={busy}>Stop all alerts for this rig</Button>
          </Form>
          {result("stop")}
        </Card>
      ) : null}

      {role === "owner" ? (
        <Card>
          <h2 className="text-xl font-bold">Rules for this rig</h2>
          <p className="text-sm text-night-300">Everyone on the rig who asked to be warned gets these. Empty boxes use the bank's own values.</p>
          <Form method="post" className="space-y-3">
            <input type="hidden" name="intent" value="rules" />
            {RULE_KINDS.map((k) => (
              <fieldset key={k} className="space-y-2 rounded-xl border border-night-700 p-3">
                <legend className="px-1 font-bold">{RULE_NAMES[k]}</legend>
                <label className="flex min-h-11 items-center gap-3"><input type="checkbox" name={`${k}.enabled`} defaultChecked={rules[k].enabled} className="size-5" />On</label>
                {k === "runway_low" ? <Field label="When the runway is below (h)" name="runway_low.belowH" type="number" step="0.25" min="0.25" defaultValue={rules.runway_low.belowH} /> : null}
                {k === "soc_low" ? <Field label="Floor (%)" hint="Empty: the bank's usable floor" name="soc_low.floorPct" type="number" min="1" max="95" defaultValue={rules.soc_low.floorPct ?? ""} /> : null}
                {k === "voltage_low" ? <Field label="Below (V)" hint="Empty: 12.0 V per 12 V of bank (trade practice)" name="voltage_low.belowV" type="number" step="0.1" defaultValue={rules.voltage_low.belowV ?? ""} /> : null}
                {k === "no_reading" ? (
                  <>
                    <Field label="After no reading for (h)" name="no_reading.afterH" type="number" step="0.5" min="0.25" defaultValue={rules.no_reading.afterH} />
                    <fieldset className="space-y-1">
                      <legend className="text-sm font-bold">Only while parked in these modes (none ticked: any mode)</legend>
                      {modes.map((m) => (
                        <label key={m.id} className="flex min-h-11 items-center gap-3">
                          <input type="checkbox" name="no_reading.parkedModeIds" value={m.id} defaultChecked={rules.no_reading.parkedModeIds.includes(m.id)} className="size-5" />
                          {m.name}
                        </label>
                      ))}
                    </fieldset>
                  </>
                ) : null}
              </fieldset>
            ))}
            <Button type="submit" disabled={busy}>Save rules</Button>
            {result("rules")}
          </Form>
        </Card>
      ) : null}

      {role === "owner" ? (
        <Card>
          <h2 className="text-xl font-bold">Devices that post readings</h2>
          <p className="text-sm text-night-300">A small computer aboard can post readings with a device token (see the README for a curl example). The token is shown once.</p>
          {answer?.intent === "device-create" && answer.token ? (
            <Notice tone="done">
              <p>Token for <b>{answer.token.name}</b> (copy it now; it is not shown again):</p>
              <code data-device-token className="block break-all rounded bg-night-950 p-2 font-mono text-sm">{answer.token.value}</code>
            </Notice>
          ) : (
            result("device-create")
          )}
          <Form method="post" className="flex flex-wrap items-end gap-3">
            <input type="hidden" name="intent" value="device-create" />
            <Field label="Device name" name="name" required maxLength={60} placeholder="Shunt reader" />
            <Button type="submit" disabled={busy}>Create token</Button>
          </Form>
          {result("device-revoke")}
          {devices.length ? (
            <ul className="divide-y divide-night-800" aria-label="Device tokens">
              {devices.map((d) => (
                <li key={d.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                  <span>
                    <b>{d.name}</b>
                    <span className="block text-sm text-night-300">
                      {d.revokedAt ? `Revoked ${when.format(new Date(d.revokedAt))}` : d.lastUsedAt ? `Last used ${when.format(new Date(d.lastUsedAt))}` : "Not used yet"}
                    </span>
                  </span>
                  {d.revokedAt ? null : (
                    <Form method="post">
                      <input type="hidden" name="intent" value="device-revoke" />
                      <input type="hidden" name="id" value={d.id} />
                      <Button type="submit" variant="danger" disabled={busy} aria-label={`Revoke ${d.name}`}>Revoke</Button>
                    </Form>
                  )}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-night-300">No devices yet.</p>
          )}
        </Card>
      ) : null}

      <Card>
        <h2 className="text-xl font-bold">Alert log</h2>
        {log.length === 0 ? (
          <p className="text-night-300">No alerts yet. When one is sent, it is listed here with who was told and how.</p>
        ) : (
          <ol className="space-y-3" aria-label="Alerts, newest first">
            {log.map((e) => (
              <li key={e.id} data-alert-rule={e.rule} className="rounded-xl border border-night-700 p-3">
                <p className="font-bold">{e.title}</p>
                <p className="text-sm text-night-300">
                  {when.format(new Date(e.startedAt))}
                  {e.clearedAt ? ` · all clear ${when.format(new Date(e.clearedAt))}` : " · still on"}
                </p>
                <p className="mt-1 text-night-100">{e.body}</p>
                {e.deliveries.length ? (
                  <ul className="mt-2 text-sm text-night-200">
                    {e.deliveries.map((d, i) => (
                      <li key={i}>
                        {d.phase === "clear" ? "All clear" : "Alert"} to {d.who} by {d.channel === "push" ? "push" : "e-mail"}: {statusWords[d.status] ?? d.status}
                        {d.error && d.status !== "sent" ? ` (${d.error})` : ""}
                      </li>
                    ))}
                  </ul>
                ) : (
                  <p className="mt-2 text-sm text-night-300">Nobody had asked to be warned of this.</p>
                )}
              </li>
            ))}
          </ol>
        )}
      </Card>
    </div>
  );
}
