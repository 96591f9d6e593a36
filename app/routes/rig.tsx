import { isRouteErrorResponse, Link } from "react-router";
import { useDisplay } from "~/hooks/use-display";
import type { Route } from "./+types/rig";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { thrownMessage } from "~/lib/http";
import { requireAsBuiltModel } from "~/repos/models.server";
import { getLatestReading, getRigState } from "~/repos/rig-state.server";
import { withSwitchHistory } from "~/repos/switch-history.server";
import { NowScreen } from "~/components/now/now-screen";
import { useModeEdit, useRigModel, useRigState, type RigModelPayload, type RigStatePayload } from "~/hooks/use-rig-now";

/** The rig's Now screen: any member may look; crew and owners may switch. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const [asBuilt, sharedState, latestReading] = await Promise.all([
    requireAsBuiltModel(db, access.rig.id),
    getRigState(db, access.rig.id),
    getLatestReading(db, access.rig.id),
  ]);
  const nowMs = Date.now();
  // The switches since the SoC entry, so the runway carries an old SoC through them.
  const state = await withSwitchHistory(db, access.rig.id, asBuilt.model, sharedState, nowMs);
  const model: RigModelPayload = { rigId: access.rig.id, name: access.rig.name, revision: asBuilt.revision, model: asBuilt.model, role: access.role };
  const shared: RigStatePayload = { state, latestReading, role: access.role };
  return { model, shared, nowMs };
}

/**
 * Offline first (app/offline): with a connection, the server's data is used and kept on the
 * phone; without one (or when the server cannot be reached) the phone's copy is shown.
 * On hydration `serverLoader()` hands back the server-rendered data without a request.
 */
export async function clientLoader({ params, serverLoader }: Route.ClientLoaderArgs) {
  // The phone's store loads with the loader, not with the page: the server-rendered numbers
  // show first. The worker precaches the module, so this works offline too.
  const [{ keepNowOffline, readNowLocal }, { serverThenPhone }] = await Promise.all([
    import("~/offline/now.client"),
    import("~/offline/offline-loader.client"),
  ]);
  return serverThenPhone(serverLoader, () => readNowLocal(params.rigId), keepNowOffline);
}
clientLoader.hydrate = true as const;

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.model.name} now · Tilldawn` : "Tilldawn" }];
}

export default function RigNow({ loaderData }: Route.ComponentProps) {
  const rigId = loaderData.model.rigId;
  const modelQuery = useRigModel(rigId, loaderData.model);
  const model = modelQuery.data ?? loaderData.model;
  const shared = useRigState(rigId, loaderData.shared, model.model);
  const modeEdit = useModeEdit(rigId);
  const display = useDisplay(model.model.timeZone);
  return (
    <NowScreen
      rigId={rigId}
      rigName={model.name}
      model={model.model}
      revision={model.revision}
      state={shared.state}
      role={shared.role}
      latestReading={shared.latestReading}
      initialNowMs={loaderData.nowMs}
      onChange={shared.change}
      onModeEdit={(body) => modeEdit.mutateAsync(body)}
      status={shared.status}
      notices={shared.notices}
      clock={display.time.clock}
    />
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const status = isRouteErrorResponse(error) ? error.status : 500;
  const message = isRouteErrorResponse(error) ? thrownMessage(error.data) : null;
  return (
    <div role="alert" className="space-y-3 rounded-2xl border border-ember-500 bg-night-900 p-4">
      <h1 className="text-2xl font-bold">{status === 404 ? "No such rig" : status === 403 ? "Not allowed" : "The Now screen could not load"}</h1>
      <p className="text-night-200">{message ?? "Something went wrong while loading this rig. Your saved data is safe; try again in a moment."}</p>
      <Link to="/rigs" className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-4 font-bold text-night-950">
        Your rigs
      </Link>
    </div>
  );
}
