import { Link } from "react-router";
import type { Route } from "./+types/rigs";
import { getDb } from "~/db/db.server";
import { listRigs } from "~/repos/rigs.server";

export async function loader() {
  return { rigs: await listRigs(getDb()) };
}

export function meta() {
  return [{ title: "Rigs · Tilldawn" }];
}

export default function Rigs({ loaderData }: Route.ComponentProps) {
  const { rigs } = loaderData;
  return (
    <div className="space-y-4">
      <h1 className="text-3xl font-bold">Rigs</h1>
      {rigs.length === 0 ? (
        <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">No rigs yet.</p>
      ) : (
        <ul className="space-y-2">
          {rigs.map((rig) => (
            <li key={rig.id}>
              <Link
                to={`/rigs/${rig.id}`}
                className="flex min-h-14 items-center rounded-2xl border border-night-700 bg-night-900 px-4 text-lg font-bold hover:border-dawn-500"
              >
                {rig.name}
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
