import { data } from "react-router";
import type { Route } from "./+types/rig";
import { getDb } from "~/db/db.server";
import { getAsBuilt, getRig } from "~/repos/rigs.server";
import { validateModel } from "~/engine/model";
import { RigOverview } from "~/components/rig-overview";
import { isUuid } from "~/lib/ids";

export async function loader({ params }: Route.LoaderArgs) {
  const db = getDb();
  const rig = isUuid(params.rigId) ? await getRig(db, params.rigId) : null;
  if (!rig) throw data({ message: "There is no such rig, or it is not shared with you." }, { status: 404 });
  const asBuilt = await getAsBuilt(db, rig.id);
  const checked = asBuilt ? validateModel(asBuilt.document) : null;
  if (!checked?.ok) throw data({ message: "This rig's model could not be read." }, { status: 500 });
  return { rig, model: checked.model, revision: asBuilt!.revision };
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.rig.name} · Tilldawn` : "Tilldawn" }];
}

export default function Rig({ loaderData }: Route.ComponentProps) {
  const { rig, model, revision } = loaderData;
  return (
    <div className="space-y-4">
      <header>
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Rig</p>
        <h1 className="text-3xl font-bold">{rig.name}</h1>
        <p className="text-night-300">As built, revision {revision}</p>
      </header>
      <RigOverview model={model} />
    </div>
  );
}
