/**
 * The account page's action (app/routes/account.tsx): save the name, save the preferences, sign
 * out everywhere, delete the account. One form per `ACCOUNT_INTENT`, each parsed with Conform.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect } from "react-router";
import type { Route } from "./+types/account";
import { clearSessionCookie, endAllSessions, requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { readIntent, type FormAnswer } from "~/lib/forms";
import { deleteAccount, RigSetChangedError, soleOwnedRigs } from "~/repos/members.server";
import { savePreferences, setName } from "~/repos/users.server";
import { ACCOUNT_INTENT, deleteAccountFormSchema, preferencesFormSchema, profileFormSchema } from "~/schemas/account";
import { readForm } from "~/lib/http";

export type AccountIntent = (typeof ACCOUNT_INTENT)[keyof typeof ACCOUNT_INTENT];
export type AccountAnswer = FormAnswer<AccountIntent> & { soleRigs?: { id: string; name: string }[] };

const answer = (status: number, body: AccountAnswer) => data<AccountAnswer>(body, { status });

export async function accountAction({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const form = await readForm(request);
  switch (readIntent(form, ACCOUNT_INTENT)) {
    case ACCOUNT_INTENT.profile: {
      const submission = parseWithZod(form, { schema: profileFormSchema });
      if (submission.status !== "success") return answer(400, { intent: ACCOUNT_INTENT.profile, result: submission.reply() });
      await setName(db, user.id, submission.value.name);
      return answer(200, { intent: ACCOUNT_INTENT.profile, result: submission.reply(), ok: "Name saved." });
    }
    case ACCOUNT_INTENT.preferences: {
      const submission = parseWithZod(form, { schema: preferencesFormSchema });
      if (submission.status !== "success") {
        return answer(400, { intent: ACCOUNT_INTENT.preferences, result: submission.reply({ formErrors: ["Check the highlighted choices."] }) });
      }
      await savePreferences(db, user.id, submission.value);
      return answer(200, { intent: ACCOUNT_INTENT.preferences, result: submission.reply(), ok: "Preferences saved." });
    }
    case ACCOUNT_INTENT.signOutEverywhere: {
      await endAllSessions(db, user.id);
      return redirect("/", { headers: { "Set-Cookie": await clearSessionCookie() } });
    }
    case ACCOUNT_INTENT.delete: {
      const submission = parseWithZod(form, { schema: deleteAccountFormSchema });
      // An unticked box sends nothing, which the schema refuses with its message.
      if (submission.status !== "success") {
        return answer(400, { intent: ACCOUNT_INTENT.delete, result: submission.reply(), soleRigs: await soleOwnedRigs(db, user.id) });
      }
      try {
        await deleteAccount(db, user.id, submission.value.rigIds);
      } catch (error) {
        if (error instanceof RigSetChangedError) {
          return answer(409, {
            intent: ACCOUNT_INTENT.delete,
            soleRigs: error.rigs,
            result: submission.reply({
              formErrors: ["The rigs that would be deleted with your account have changed. Check the list again, then confirm."],
            }),
          });
        }
        throw error;
      }
      return redirect("/", { headers: { "Set-Cookie": await clearSessionCookie() } });
    }
    default:
      return data({ error: { code: "unknown_intent", message: "Unknown request." } }, { status: 400 });
  }
}
