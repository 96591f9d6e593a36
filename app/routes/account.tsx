import { useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/account";
import { protectedAction } from "~/auth/csrf.server";
import { requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { soleOwnedRigs } from "~/repos/members.server";
import { countSessions } from "~/repos/users.server";
import { answerFor, fieldProps, formError } from "~/lib/forms";
import { ACCOUNT_INTENT, deleteAccountFormSchema, preferencesFormSchema, profileFormSchema } from "~/schemas/account";
import { OfflineCopy } from "~/components/offline-copy";
import { Button, Card, Field, Notice } from "~/components/ui/form";
import { accountAction, type AccountAnswer, type AccountIntent } from "./account.server";

/** GET /account — name, e-mail, units, night mode, signing out, deleting the account. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const [soleRigs, sessionCount] = await Promise.all([soleOwnedRigs(db, user.id), countSessions(db, user.id)]);
  return { name: user.name, email: user.email, preferences: user.preferences, soleRigs, sessions: sessionCount };
}

/** Offline: the copy this phone kept the last time the page was shown online. */
export async function clientLoader({ serverLoader }: Route.ClientLoaderArgs) {
  const { serverOrPhoneCopy } = await import("~/offline/offline-loader.client");
  return serverOrPhoneCopy("account", serverLoader);
}

export const action = protectedAction(accountAction);

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
  const [profileForm, profile] = useForm({
    id: ACCOUNT_INTENT.profile,
    lastResult: answerFor(answer, ACCOUNT_INTENT.profile),
    defaultValue: { name },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: profileFormSchema }),
    shouldValidate: "onSubmit",
  });
  const [preferencesForm, prefs] = useForm({
    id: ACCOUNT_INTENT.preferences,
    lastResult: answerFor(answer, ACCOUNT_INTENT.preferences),
    onValidate: ({ formData }) => parseWithZod(formData, { schema: preferencesFormSchema }),
    shouldValidate: "onSubmit",
  });
  const [deleteForm, deletion] = useForm({
    id: ACCOUNT_INTENT.delete,
    lastResult: answerFor(answer, ACCOUNT_INTENT.delete),
    onValidate: ({ formData }) => parseWithZod(formData, { schema: deleteAccountFormSchema }),
    shouldValidate: "onSubmit",
  });
  const notice = (intent: AccountIntent) => {
    const result = answerFor(answer, intent);
    const error = formError(result);
    return (
      <div aria-live="polite">
        {result && answer?.ok ? <Notice tone="done">{answer.ok}</Notice> : null}
        {error ? <Notice tone="error">{error}</Notice> : null}
      </div>
    );
  };
  const confirmError = deletion.confirm.errors?.[0];

  return (
    <div className="space-y-6">
      <h1 className="text-3xl font-bold">Account</h1>
      <OfflineCopy pageKey={"account"} data={loaderData} copy={"offlineCopy" in loaderData ? loaderData.offlineCopy : null} what="Changes to your account" />

      <Card>
        <h2 className="text-xl font-bold">You</h2>
        {notice(ACCOUNT_INTENT.profile)}
        <p className="text-night-200">
          E-mail: <strong>{email}</strong>
        </p>
        <Form method="post" id={profileForm.id} onSubmit={profileForm.onSubmit} className="space-y-4" noValidate>
          <input type="hidden" name="intent" value={ACCOUNT_INTENT.profile} />
          <Field
            label="Name"
            key={profile.name.key}
            {...fieldProps(profile.name, name)}
            autoComplete="name"
            maxLength={80}
            required
          />
          <Button type="submit" disabled={busy === ACCOUNT_INTENT.profile}>
            {busy === ACCOUNT_INTENT.profile ? "Saving…" : "Save name"}
          </Button>
        </Form>
      </Card>

      <Card>
        <h2 className="text-xl font-bold">Units and display</h2>
        {notice(ACCOUNT_INTENT.preferences)}
        <Form method="post" id={preferencesForm.id} onSubmit={preferencesForm.onSubmit} className="space-y-4">
          <input type="hidden" name="intent" value={ACCOUNT_INTENT.preferences} />
          <Choice legend="Lengths" name={prefs.lengthUnit.name} value={preferences.lengthUnit} options={[["metric", "Metres"], ["imperial", "Feet"]]} error={prefs.lengthUnit.errors?.[0]} />
          <Choice legend="Cable sizes" name={prefs.cableUnit.name} value={preferences.cableUnit} options={[["mm2", "mm²"], ["awg", "AWG"]]} error={prefs.cableUnit.errors?.[0]} />
          <Choice legend="Temperatures" name={prefs.temperatureUnit.name} value={preferences.temperatureUnit} options={[["c", "°C"], ["f", "°F"]]} error={prefs.temperatureUnit.errors?.[0]} />
          <Choice legend="Clock" name={prefs.clock.name} value={preferences.clock} options={[["24h", "24-hour (20:30)"], ["12h", "12-hour (8:30 PM)"]]} error={prefs.clock.errors?.[0]} />
          <label className="flex min-h-12 items-center gap-3">
            <input type="checkbox" name={prefs.nightDefault.name} defaultChecked={preferences.nightDefault} className="size-5" />
            <span>
              <span className="block font-bold">Start in red night mode</span>
              <span className="block text-sm text-night-300">On devices where you have not switched night mode yourself.</span>
            </span>
          </label>
          <Button type="submit" disabled={busy === ACCOUNT_INTENT.preferences}>
            {busy === ACCOUNT_INTENT.preferences ? "Saving…" : "Save preferences"}
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
            <input type="hidden" name="intent" value={ACCOUNT_INTENT.signOutEverywhere} />
            <Button type="submit" variant="quiet">
              Sign out everywhere
            </Button>
          </Form>
        </div>
      </Card>

      <Card className="border-ember-500">
        <h2 className="text-xl font-bold">Delete account</h2>
        {notice(ACCOUNT_INTENT.delete)}
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
        <Form method="post" id={deleteForm.id} onSubmit={deleteForm.onSubmit} className="space-y-3">
          <input type="hidden" name="intent" value={ACCOUNT_INTENT.delete} />
          <input type="hidden" name={deletion.rigIds.name} value={soleRigs.map((r) => r.id).join(",")} />
          <label className="flex min-h-12 items-center gap-3">
            <input
              type="checkbox"
              name={deletion.confirm.name}
              // A new list of rigs asks for a new confirmation: the box starts unticked again.
              key={`${deletion.confirm.key}-${soleRigs.map((r) => r.id).join(",")}`}
              className="size-5"
              aria-invalid={confirmError ? true : undefined}
              aria-describedby={confirmError ? "confirm-error" : undefined}
            />
            <span>
              {soleRigs.length
                ? `Delete my account and ${soleRigs.map((r) => r.name).join(", ")}`
                : "Delete my account"}
            </span>
          </label>
          {confirmError ? (
            <p id="confirm-error" className="text-sm font-bold text-ember-300">
              {confirmError}
            </p>
          ) : null}
          <Button type="submit" variant="danger" disabled={busy === ACCOUNT_INTENT.delete}>
            {busy === ACCOUNT_INTENT.delete ? "Deleting…" : "Delete account"}
          </Button>
        </Form>
      </Card>
    </div>
  );
}
