import { Link } from "react-router";
import type { Route } from "./+types/home";
import { getDb } from "~/db/db.server";
import { getAsBuilt, listRigs } from "~/repos/rigs.server";
import { validateModel } from "~/engine/model";
import { RigOverview } from "~/components/rig-overview";

export async function loader() {
  const db = getDb();
  const [first] = await listRigs(db);
  if (!first) return { rig: null, model: null };
  const asBuilt = await getAsBuilt(db, first.id);
  const checked = asBuilt ? validateModel(asBuilt.document) : null;
  return { rig: first, model: checked?.ok ? checked.model : null };
}

export function meta() {
  return [{ title: "Tilldawn — will the bank last till dawn?" }];
}

export default function Home({ loaderData }: Route.ComponentProps) {
  const { rig, model } = loaderData;
  if (!rig) {
    return (
      <div className="space-y-3">
        <h1 className="text-3xl font-bold">Tilldawn</h1>
        <p className="text-night-200">No rig has been set up yet.</p>
      </div>
    );
  }
  return (
    <div className="space-y-4">
      <header>
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Tilldawn</p>
        <h1 className="text-3xl font-bold">
          <Link to={`/rigs/${rig.id}`} className="hover:text-dawn-300">
            {rig.name}
          </Link>
        </h1>
      </header>
      {model ? <RigOverview model={model} /> : <p role="alert">This rig's model could not be read.</p>}
    </div>
  );
}
