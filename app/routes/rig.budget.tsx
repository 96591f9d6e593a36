import { Link } from "react-router";
import type { Route } from "./+types/rig.budget";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { requireAsBuiltModel } from "~/repos/models.server";
import { getRigState } from "~/repos/rig-state.server";
import { BudgetView } from "~/components/budget/budget-view";

/** A day's energy budget for the rig's present mode and switches. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const [{ model }, state] = await Promise.all([requireAsBuiltModel(db, access.rig.id), getRigState(db, access.rig.id)]);
  return { rig: access.rig, model, state, nowMs: Math.floor(Date.now() / 60_000) * 60_000 };
}

/** Offline first: the server's copy when it answers, else the one kept on the phone by Now. */
export async function clientLoader({ params, serverLoader }: Route.ClientLoaderArgs) {
  const { rigReadViewLoader } = await import("~/offline/offline-loader.client");
  return rigReadViewLoader(params.rigId, serverLoader);
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.rig.name} day budget · Tilldawn` : "Tilldawn" }];
}

export default function RigBudget({ loaderData }: Route.ComponentProps) {
  const { rig, model, state, nowMs } = loaderData;
  const mode = model.modes.find((m) => m.id === state.modeId) ?? model.modes[0]!;
  return (
    <div className="space-y-4">
      <header>
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Day budget</p>
        <h1 className="text-3xl font-bold">{rig.name}</h1>
        <p className="text-night-300">Mode “{mode.name}” with the switches as they are now.</p>
      </header>
      <BudgetView model={model} state={state} atMs={nowMs} />
      <Link to={`/rigs/${rig.id}`} className="inline-flex min-h-12 items-center rounded-xl border border-night-600 px-4 font-bold">
        Back to Now
      </Link>
    </div>
  );
}
