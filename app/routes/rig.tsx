import { data, Link } from "react-router";
import type { Route } from "./+types/rig";
import { requireRigRole } from "~/auth/guards.server";
import { roleLabel } from "~/auth/roles";
import { getDb } from "~/db/db.server";
import { getAsBuilt } from "~/repos/rigs.server";
import { validateModel } from "~/engine/model";
import { RigOverview } from "~/components/rig-overview";
import { lastRigSetCookie } from "~/lib/last-rig";

/** GET /rigs/:rigId — members only (anyone else: 404). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { rig, role } = await requireRigRole(request, params.rigId, "guest");
  const asBuilt = await getAsBuilt(getDb(), rig.id);
  const checked = asBuilt ? validateModel(asBuilt.document) : null;
  if (!checked?.ok) throw data({ message: "This rig's model could not be read." }, { status: 500 });
  return data(
    { rig, role, model: checked.model, revision: asBuilt!.revision },
    { headers: { "Set-Cookie": lastRigSetCookie(rig.id) } },
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.rig.name} · Tilldawn` : "Tilldawn" }];
}

export default function Rig({ loaderData }: Route.ComponentProps) {
  const { rig, role, model, revision } = loaderData;
  return (
    <div className="space-y-4">
      <header className="space-y-1">
        <div className="flex items-center justify-between gap-3">
          <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Rig</p>
          <Link to="/rigs" className="inline-flex min-h-12 items-center text-sm font-bold text-night-300 underline">
            Switch rig
          </Link>
        </div>
        <h1 className="text-3xl font-bold">{rig.name}</h1>
        <p className="text-night-300">
          As built, revision {revision} · You are {roleLabel[role].toLowerCase()}
        </p>
      </header>
      {role === "guest" ? (
        <p role="note" className="rounded-2xl border border-night-600 bg-night-900 p-4 text-night-200">
          You follow this rig as a guest: read-only.
        </p>
      ) : null}
      <RigOverview model={model} />
      <Link
        to={`/rigs/${rig.id}/members`}
        className="flex min-h-14 items-center justify-between rounded-2xl border border-night-700 bg-night-900 px-4 font-bold hover:border-dawn-500"
      >
        People on this rig <span aria-hidden="true">›</span>
      </Link>
    </div>
  );
}
