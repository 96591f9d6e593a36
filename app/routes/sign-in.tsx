import { Form, Link, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/sign-in";
import { protectedAction } from "~/auth/csrf.server";
import { getUser, safeRedirect } from "~/auth/session.server";
import { readCodeCookie, requestCode, restartSignIn, verifyCode, type SignInFormResult } from "~/auth/sign-in.server";
import { CODE_VALID_MINUTES } from "~/auth/constants";
import { Button, Field, Notice } from "~/components/ui/form";
import { apiError, readForm } from "~/lib/http";

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const redirectTo = safeRedirect(url.searchParams.get("redirectTo"));
  if (await getUser(request)) throw redirect(redirectTo);
  const cookie = readCodeCookie(request);
  return {
    step: cookie.jwe && cookie.email ? ("code" as const) : ("email" as const),
    email: cookie.email ?? url.searchParams.get("email") ?? "",
    error: cookie.error,
    redirectTo,
  };
}

export const action = protectedAction(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  const redirectTo = safeRedirect(form.get("redirectTo"));
  switch (form.get("intent")) {
    case "send":
      return requestCode(request, { email: form.get("email"), redirectTo }, context);
    case "resend":
      return requestCode(request, { email: readCodeCookie(request).email ?? "", redirectTo }, context);
    case "verify":
      return verifyCode(request, { code: String(form.get("code") ?? ""), redirectTo });
    case "restart":
      return restartSignIn(redirectTo);
    default:
      throw apiError(400, "unknown_intent", "Unknown sign-in step: send intent send, resend, verify or restart.");
  }
});

export function meta() {
  return [{ title: "Sign in · Tilldawn" }];
}

export default function SignIn({ loaderData }: Route.ComponentProps) {
  const answer = useActionData<SignInFormResult>();
  const navigation = useNavigation();
  const busy = navigation.state !== "idle" ? String(navigation.formData?.get("intent") ?? "") : "";
  const step = answer?.step ?? loaderData.step;
  const email = answer?.values.email ?? loaderData.email;
  const redirectTo = answer?.values.redirectTo ?? loaderData.redirectTo;
  const error = answer?.error ?? (answer ? undefined : loaderData.error);

  return (
    <div className="mx-auto max-w-md space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Tilldawn</p>
        <h1 className="text-3xl font-bold">Sign in</h1>
        <p className="text-night-200">
          No password: we e-mail you a code. New here? The same code creates your account.
        </p>
      </header>

      <div aria-live="polite">{error ? <Notice tone="error">{error}</Notice> : null}</div>

      {step === "email" ? (
        <Form method="post" className="space-y-4" noValidate>
          <input type="hidden" name="redirectTo" value={redirectTo} />
          <Field
            label="E-mail address"
            name="email"
            type="email"
            inputMode="email"
            autoComplete="email"
            required
            autoFocus
            defaultValue={email}
            error={answer?.fieldErrors?.email}
          />
          <Button type="submit" name="intent" value="send" className="w-full" disabled={busy === "send"}>
            {busy === "send" ? "Sending the code…" : "E-mail me a code"}
          </Button>
        </Form>
      ) : (
        <div className="space-y-4">
          <Notice>
            We sent a 6-digit code to <strong>{email}</strong>. It works for {CODE_VALID_MINUTES} minutes. You can
            also open the link in that e-mail in this browser.
          </Notice>
          <Form method="post" className="space-y-4" noValidate>
            <input type="hidden" name="redirectTo" value={redirectTo} />
            <Field
              label="Code from the e-mail"
              name="code"
              inputMode="numeric"
              autoComplete="one-time-code"
              pattern="[0-9 ]*"
              maxLength={8}
              required
              autoFocus
              className="tabular"
              error={answer?.fieldErrors?.code}
            />
            <Button type="submit" name="intent" value="verify" className="w-full" disabled={busy === "verify"}>
              {busy === "verify" ? "Checking…" : "Sign in"}
            </Button>
          </Form>
          <Form method="post" className="flex flex-wrap gap-3">
            <input type="hidden" name="redirectTo" value={redirectTo} />
            <Button type="submit" name="intent" value="resend" variant="quiet" disabled={busy === "resend"}>
              {busy === "resend" ? "Sending…" : "Send a new code"}
            </Button>
            <Button type="submit" name="intent" value="restart" variant="quiet">
              Use another address
            </Button>
          </Form>
        </div>
      )}
      <p className="text-sm text-night-300">
        <Link to="/" className="underline">
          Back to the start
        </Link>
      </p>
    </div>
  );
}
