import { data, Form, redirect, useActionData, useNavigation } from "react-router";
import { count, eq } from "drizzle-orm";
import type { Route } from "./+types/account";
import { protectedAction } from "~/auth/csrf.server";
import { clearSessionCookie, endAllSessions, requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { sessions } from "~/db/schema";
import { deleteAccount, RigSetChangedError, soleOwnedRigs } from "~/repos/members.server";
import { nameSchema, preferencesSchema, savePreferences, setName } from "~/repos/users.server";
import { OfflineCopy } from "~/components/offline-copy";
import { Button, Card, Field, Notice } from "~/components/ui/form";

/** GET /account — name, e-mail, units, night mode, signing out, deleting the account. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const [soleRigs, [sessionCount]] = await Promise.all([
    soleOwnedRigs(db, user.id),
    db.select({ n: count() }).from(sessions).where(eq(sessions.userId, user.id)),
  ]);
  return { name: user.name, email: user.email, preferences: user.preferences, soleRigs, sessions: sessionCount?.n ?? 1 };
}

/** Offline: the copy this phone kept the last time the page was shown online. */
export async function clientLoader({ serverLoader }: Route.ClientLoaderArgs) {
  const { serverOrPhoneCopy } = await import("~/offline/offline-loader.client");
  return serverOrPhoneCopy("account", serverLoader);
}

type AccountAnswer = {
  intent: string;
  ok?: string;
  error?: string;
  fieldErrors?: Record<string, string | undefined>;
  values?: Record<string, string>;
  soleRigs?: { id: string; name: string }[];
};

export const action = protectedAction(async ({ request }: Route.ActionArgs) => {
  const user = await requireUser(request);
  const db = getDb();
  const form = await request.formData();
  const intent = String(form.get("intent") ?? "");
  const answer = (status: number, rest: Omit<AccountAnswer, "intent">) => data<AccountAnswer>({ intent, ...rest }, { status });
  switch (intent) {
    case "profile": {
      const typed = String(form.get("name") ?? "");
      const parsed = nameSchema.safeParse(typed);
      if (!parsed.success) return answer(400, { values: { name: typed }, fieldErrors: { name: parsed.error.issues[0]?.message } });
      await setName(db, user.id, parsed.data);
      return answer(200, { ok: "Name saved." });
    }
    case "preferences": {
      const parsed = preferencesSchema.safeParse({
        lengthUnit: form.get("lengthUnit"),
        cableUnit: form.get("cableUnit"),
        temperatureUnit: form.get("temperatureUnit"),
        nightDefault: form.get("nightDefault") === "on",
        clock: form.get("clock"),
      });
      if (!parsed.success) {
        const fieldErrors = Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message]));
        return answer(400, { error: "Check the highlighted choices.", fieldErrors });
      }
      await savePreferences(db, user.id, parsed.data);
      return answer(200, { ok: "Preferences saved." });
    }
    case "sign-out-everywhere": {
      await endAllSessions(db, user.id);
      return redirect("/", { headers: { "Set-Cookie": await clearSessionCookie() } });
    }
    case "delete": {
      const confirmed = form.get("confirm") === "on";
      const rigIds = String(form.get("rigIds") ?? "").split(",").filter(Boolean);
      if (!confirmed) {
        return answer(400, {
          soleRigs: await soleOwnedRigs(db, user.id),
          fieldErrors: { confirm: "Tick the box to confirm that you want to delete your account." },
        });
      }
      try {
        await deleteAccount(db, user.id, rigIds);
      } catch (error) {
        if (error instanceof RigSetChangedError) {
          return answer(409, {
            soleRigs: error.rigs,
            error: "The rigs that would be deleted with your account have changed. Check the list again, then confirm.",
          });
        }
        throw error;
      }
      return redirect("/", { headers: { "Set-Cookie": await clearSessionCookie() } });
    }
    default:
      return answer(400, { error: "Unknown request." });
  }
});

export function meta() {
  return [{ title: "Account · Tilldawn" }];
}

function Choice({ name, options, value, legend, error }: { name: string; legend: string; value: string; error?: string; options: [string, string][] }) {
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">{legend}</legend>
      <div className="flex flex-wrap gap-2">
        {options.map(([v, label]) => (
          <label key={v} className="flex min-h-12 items-center gap-2 rounded-xl border border-night-700 px-4 has-[:checked]:border-dawn-500">
            <input type="radio" name={name} value={v} defaultChecked={value === v} className="size-5" />
            {label}
          </label>
        ))}
      </div>
      {error ? <p className="text-sm font-bold text-ember-300">{error}</p> : null}
    </fieldset>
  );
}

export default function Account({ loaderData }: Route.ComponentProps) {
  const { name, email, preferences, sessions: sessionCount } = loaderData;
  const answer = useActionData<AccountAnswer>();
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" ? String(navigation.formData?.get("intent") ?? "") : "";
  const soleRigs = answer?.soleRigs ?? loaderData.soleRigs;
  const notice = (intent: string) =>
    answer?.intent === intent ? (
      <div aria-live="polite">
        {answer.ok ? <Notice tone="done">{answer.ok}</Notice> : null}
        {answer.error ? <Notice tone="error">{answer.error}</Notice> : null}
      </div>
    ) : (
      <div aria-live="polite" />
    );

  return (
    <div className="space-y-6">
      <h1 className="text-3xl font-bold">Account</h1>
      <OfflineCopy pageKey={"account"} data={loaderData} copy={"offlineCopy" in loaderData ? loaderData.offlineCopy : null} what="Changes to your account" />

      <Card>
        <h2 className="text-xl font-bold">You</h2>
        {notice("profile")}
        <p className="text-night-200">
          E-mail: <strong>{email}</strong>
        </p>
        <Form method="post" className="space-y-4" noValidate>
          <input type="hidden" name="intent" value="profile" />
          <Field
            label="Name"
            name="name"
            autoComplete="name"
            maxLength={80}
            required
            defaultValue={answer?.intent === "profile" && answer.values ? answer.values.name : name}
            error={answer?.intent === "profile" ? answer.fieldErrors?.name : undefined}
          />
          <Button type="submit" disabled={busy === "profile"}>
            {busy === "profile" ? "Saving…" : "Save name"}
          </Button>
        </Form>
      </Card>

      <Card>
        <h2 className="text-xl font-bold">Units and display</h2>
        {notice("preferences")}
        <Form method="post" className="space-y-4">
          <input type="hidden" name="intent" value="preferences" />
          <Choice legend="Lengths" name="lengthUnit" value={preferences.lengthUnit} options={[["metric", "Metres"], ["imperial", "Feet"]]} error={answer?.fieldErrors?.lengthUnit} />
          <Choice legend="Cable sizes" name="cableUnit" value={preferences.cableUnit} options={[["mm2", "mm²"], ["awg", "AWG"]]} error={answer?.fieldErrors?.cableUnit} />
          <Choice legend="Temperatures" name="temperatureUnit" value={preferences.temperatureUnit} options={[["c", "°C"], ["f", "°F"]]} error={answer?.fieldErrors?.temperatureUnit} />
          <Choice legend="Clock" name="clock" value={preferences.clock} options={[["24h", "24-hour (20:30)"], ["12h", "12-hour (8:30 PM)"]]} error={answer?.fieldErrors?.clock} />
          <label className="flex min-h-12 items-center gap-3">
            <input type="checkbox" name="nightDefault" defaultChecked={preferences.nightDefault} className="size-5" />
            <span>
              <span className="block font-bold">Start in red night mode</span>
              <span className="block text-sm text-night-300">On devices where you have not switched night mode yourself.</span>
            </span>
          </label>
          <Button type="submit" disabled={busy === "preferences"}>
            {busy === "preferences" ? "Saving…" : "Save preferences"}
          </Button>
        </Form>
      </Card>

      <Card>
        <h2 className="text-xl font-bold">Signing out</h2>
        <p className="text-night-200">
          You are signed in on {sessionCount} {sessionCount === 1 ? "device" : "devices or browsers"}.
        </p>
        <div className="flex flex-wrap gap-3">
          <Form method="post" action="/sign-out">
            <Button type="submit" variant="quiet">
              Sign out
            </Button>
          </Form>
          <Form method="post">
            <input type="hidden" name="intent" value="sign-out-everywhere" />
            <Button type="submit" variant="quiet">
              Sign out everywhere
            </Button>
          </Form>
        </div>
      </Card>

      <Card className="border-ember-500">
        <h2 className="text-xl font-bold">Delete account</h2>
        {notice("delete")}
        {soleRigs.length ? (
          <div className="space-y-2 text-night-200">
            <p>You are the only owner of these rigs. They are deleted with your account, for everyone on them:</p>
            <ul className="list-disc pl-6 font-bold text-night-100" aria-label="Rigs deleted with the account">
              {soleRigs.map((r) => (
                <li key={r.id}>{r.name}</li>
              ))}
            </ul>
            <p className="text-sm">To keep a rig, make someone else its owner first.</p>
          </div>
        ) : (
          <p className="text-night-200">Rigs you share with other owners stay with them.</p>
        )}
        <Form method="post" className="space-y-3">
          <input type="hidden" name="intent" value="delete" />
          <input type="hidden" name="rigIds" value={soleRigs.map((r) => r.id).join(",")} />
          <label className="flex min-h-12 items-center gap-3">
            <input
              type="checkbox"
              name="confirm"
              className="size-5"
              aria-invalid={answer?.fieldErrors?.confirm ? true : undefined}
              aria-describedby={answer?.fieldErrors?.confirm ? "confirm-error" : undefined}
            />
            <span>
              {soleRigs.length
                ? `Delete my account and ${soleRigs.map((r) => r.name).join(", ")}`
                : "Delete my account"}
            </span>
          </label>
          {answer?.fieldErrors?.confirm ? (
            <p id="confirm-error" className="text-sm font-bold text-ember-300">
              {answer.fieldErrors.confirm}
            </p>
          ) : null}
          <Button type="submit" variant="danger" disabled={busy === "delete"}>
            {busy === "delete" ? "Deleting…" : "Delete account"}
          </Button>
        </Form>
      </Card>
    </div>
  );
}
