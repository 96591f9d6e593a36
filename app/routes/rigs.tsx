import { useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/rigs";
import { protectedAction } from "~/auth/csrf.server";
import { requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { createRig, listRigsForUser } from "~/repos/rigs.server";
import { starterModel } from "~/repos/starter-model";
import { fieldProps } from "~/lib/forms";
import { createRigFormSchema } from "~/schemas/rigs";
import { RigList } from "~/components/account/rig-list";
import { OfflineCopy } from "~/components/offline-copy";
import { Button, Card, Field } from "~/components/ui/form";
import { readForm } from "~/lib/http";

/** GET /rigs — the rigs this person is on, with their role; POST creates one they own. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const rigs = await listRigsForUser(getDb(), user.id);
  return { rigs: rigs.map(({ id, name, role }) => ({ id, name, role })) };
}

/** Offline: the copy this phone kept the last time the page was shown online. */
export async function clientLoader({ serverLoader }: Route.ClientLoaderArgs) {
  const { serverOrPhoneCopy } = await import("~/offline/offline-loader.client");
  return serverOrPhoneCopy("rigs", serverLoader);
}

export const action = protectedAction(async ({ request }: Route.ActionArgs) => {
  const user = await requireUser(request);
  const submission = parseWithZod(await readForm(request), { schema: createRigFormSchema });
  if (submission.status !== "success") return data({ result: submission.reply() }, { status: 400 });
  const { name } = submission.value;
  const { rig } = await createRig(getDb(), { name, ownerId: user.id, document: starterModel({ name }), message: "New rig" });
  return redirect(`/rigs/${rig.id}`);
});

export function meta() {
  return [{ title: "Rigs · Tilldawn" }];
}

export default function Rigs({ loaderData }: Route.ComponentProps) {
  const { rigs } = loaderData;
  const answer = useActionData<typeof action>();
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useForm({
    lastResult: answer?.result,
    onValidate: ({ formData }) => parseWithZod(formData, { schema: createRigFormSchema }),
    shouldValidate: "onSubmit",
  });
  return (
    <div className="space-y-6">
      <h1 className="text-3xl font-bold">Rigs</h1>
      <OfflineCopy pageKey={"rigs"} data={loaderData} copy={"offlineCopy" in loaderData ? loaderData.offlineCopy : null} what="Creating a rig and opening a rig not kept on this phone" />
      {rigs.length === 0 ? (
        <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">
          You are not on any rig yet. Create one below, or open an invitation link from a rig's owner.
        </p>
      ) : (
        <RigList rigs={rigs} />
      )}
      <Card>
        <h2 id="create" className="text-xl font-bold">
          Create a rig
        </h2>
        <p className="text-night-200">
          You become its owner. It starts with one 100 Ah LiFePO4 house bank and a main DC bus, ready for you to record
          it as built.
        </p>
        <Form method="post" id={form.id} onSubmit={form.onSubmit} className="space-y-4" noValidate>
          <Field
            label="Rig name"
            key={fields.name.key}
            {...fieldProps(fields.name)}
            required
            maxLength={80}
            placeholder="e.g. Kestrel"
          />
          <Button type="submit" disabled={busy}>
            {busy ? "Creating…" : "Create rig"}
          </Button>
        </Form>
      </Card>
    </div>
  );
}
