import { Link } from "react-router";
import type { Route } from "./+types/rig.model";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { requireAsBuiltModel } from "~/repos/models.server";
import { RigOverview } from "~/components/rig-overview";

/** The rig as built: its banks and loads (the former rig overview). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const { model, revision } = await requireAsBuiltModel(db, access.rig.id);
  return { rig: access.rig, model, revision };
}

/** Offline first: the server's copy when it answers, else the one kept on the phone by Now. */
export async function clientLoader({ params, serverLoader }: Route.ClientLoaderArgs) {
  const { rigReadViewLoader } = await import("~/offline/offline-loader.client");
  return rigReadViewLoader(params.rigId, serverLoader);
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.rig.name} as built · Tilldawn` : "Tilldawn" }];
}

export default function RigModelPage({ loaderData }: Route.ComponentProps) {
  const { rig, model, revision } = loaderData;
  return (
    <div className="space-y-4">
      <header>
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Rig</p>
        <h1 className="text-3xl font-bold">{rig.name}</h1>
        <p className="text-night-300">As built, revision {revision}</p>
      </header>
      <RigOverview model={model} />
      <Link to={`/rigs/${rig.id}/photos`} className="mr-2 inline-flex min-h-12 items-center rounded-xl border border-night-600 px-4 font-bold">
        Photos
      </Link>
      <Link to={`/rigs/${rig.id}`} className="inline-flex min-h-12 items-center rounded-xl border border-night-600 px-4 font-bold">
        Back to Now
      </Link>
    </div>
  );
}
