import { Link } from "react-router";
import { roleLabel, type Role } from "~/auth/roles";
import { cn } from "~/lib/cn";

export type RigListItem = { id: string; name: string; role: Role };

/** The rigs a person belongs to, each with their role on it. */
export function RigList({ rigs, currentId }: { rigs: RigListItem[]; currentId?: string }) {
  return (
    <ul className="space-y-2">
      {rigs.map((rig) => (
        <li key={rig.id}>
          <Link
            to={`/rigs/${rig.id}`}
            aria-current={rig.id === currentId ? "page" : undefined}
            className={cn(
              "flex min-h-14 items-center justify-between gap-3 rounded-2xl border bg-night-900 px-4 hover:border-dawn-500",
              rig.id === currentId ? "border-dawn-500" : "border-night-700",
            )}
          >
            <span className="text-lg font-bold">{rig.name}</span>
            <span className="rounded-full border border-night-600 px-3 py-1 text-sm font-bold text-night-200">
              {roleLabel[rig.role]}
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}
