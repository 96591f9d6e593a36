import { useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/welcome";
import { protectedAction } from "~/auth/csrf.server";
import { requireUser, safeRedirect } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { setName } from "~/repos/users.server";
import { fieldProps } from "~/lib/forms";
import { profileFormSchema } from "~/schemas/account";
import { Button, Field } from "~/components/ui/form";
import { readForm } from "~/lib/http";

/** GET /welcome — asked once, after a first sign-in: the name the crew will see. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const redirectTo = safeRedirect(new URL(request.url).searchParams.get("redirectTo"));
  if (user.name) throw redirect(redirectTo);
  return { email: user.email, redirectTo };
}

export const action = protectedAction(async ({ request }: Route.ActionArgs) => {
  const user = await requireUser(request);
  const form = await readForm(request);
  const redirectTo = safeRedirect(form.get("redirectTo"));
  const submission = parseWithZod(form, { schema: profileFormSchema });
  if (submission.status !== "success") return data({ result: submission.reply() }, { status: 400 });
  await setName(getDb(), user.id, submission.value.name);
  return redirect(redirectTo);
});

export function meta() {
  return [{ title: "Welcome · Tilldawn" }];
}

export default function Welcome({ loaderData }: Route.ComponentProps) {
  const answer = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: answer?.result,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: profileFormSchema }),
    shouldValidate: "onSubmit",
  });
  return (
    <div className="mx-auto max-w-md space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Welcome aboard</p>
        <h1 className="text-3xl font-bold">What should we call you?</h1>
        <p className="text-night-200">
          You are signed in as {loaderData.email}. People you share a rig with see this name.
        </p>
      </header>
      <Form method="post" id={form.id} onSubmit={form.onSubmit} className="space-y-4" noValidate>
        <input type="hidden" name="redirectTo" value={loaderData.redirectTo} />
        <Field
          label="Your name"
          key={fields.name.key}
          {...fieldProps(fields.name)}
          autoComplete="name"
          required
          autoFocus
          maxLength={80}
        />
        <Button type="submit" className="w-full" disabled={busy}>
          {busy ? "Saving…" : "Continue"}
        </Button>
      </Form>
    </div>
  );
}
