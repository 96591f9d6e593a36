import { Link, redirect } from "react-router";
import type { Route } from "./+types/home";
import { getUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { listRigsForUser } from "~/repos/rigs.server";
import { lastRigFromCookieHeader } from "~/lib/last-rig";
import { RigList } from "~/components/account/rig-list";

/**
 * Signed out: what Tilldawn is, and the way in. Signed in: straight to the rig last opened in
 * this browser (or the only one); with several or none, the list and "create a rig".
 */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  if (!user) return { signedIn: false as const, rigs: [] };
  const rigs = await listRigsForUser(getDb(), user.id);
  const last = lastRigFromCookieHeader(request.headers.get("cookie"));
  const target = rigs.find((r) => r.id === last) ?? (rigs.length === 1 ? rigs[0] : undefined);
  if (target) throw redirect(`/rigs/${target.id}`);
  return { signedIn: true as const, rigs: rigs.map(({ id, name, role }) => ({ id, name, role })) };
}

export function meta() {
  return [{ title: "Tilldawn — will the bank last till dawn?" }];
}

export default function Home({ loaderData }: Route.ComponentProps) {
  if (!loaderData.signedIn) {
    return (
      <div className="mx-auto max-w-xl space-y-6 py-6">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Tilldawn</p>
        <h1 className="text-4xl font-bold leading-tight">Will the bank last till dawn?</h1>
        <p className="text-lg text-night-200">
          For vans, motorhomes, trailers and boats that live off their own battery bank: the runway to the
          low-voltage cutoff, the day's budget, and a true record of how the rig is wired — on your phone, with or
          without signal. Share a rig with your crew, and let family at home follow along.
        </p>
        <Link
          to="/sign-in"
          className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-6 text-lg font-bold text-night-950"
        >
          Sign in
        </Link>
      </div>
    );
  }
  const { rigs } = loaderData;
  return (
    <div className="space-y-4">
      <h1 className="text-3xl font-bold">{rigs.length ? "Choose a rig" : "Welcome to Tilldawn"}</h1>
      {rigs.length ? (
        <RigList rigs={rigs} />
      ) : (
        <p className="text-night-200">
          You are not on any rig yet. Create one for your own vehicle or boat, or open the invitation link someone
          sent you.
        </p>
      )}
      <Link to="/rigs#create" className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-5 font-bold text-night-950">
        Create a rig
      </Link>
    </div>
  );
}
