import type { Route } from "./+types/api.v1.me";
import { requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { listRigsForUser } from "~/repos/rigs.server";

/** GET /api/v1/me — who is signed in and their rigs with roles; 401 JSON when nobody is. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const rigs = await listRigsForUser(getDb(), user.id);
  return Response.json(
    {
      user: { id: user.id, email: user.email, name: user.name, preferences: user.preferences },
      rigs: rigs.map(({ id, name, role }) => ({ id, name, role })),
    },
    { headers: { "cache-control": "private, no-store" } },
  );
}
