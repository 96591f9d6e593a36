import { useEffect, useMemo, useState } from "react";
import { Link } from "react-router";
import type { Route } from "./+types/rig.photos";
import { requireRigRole } from "~/auth/guards.server";
import { PhotoStrip } from "~/components/photos/photo-strip";
import { getDb } from "~/db/db.server";
import { loadRigPhotos } from "~/photos/loader.server";
import { PLACE_MAX } from "~/photos/limits";
import { partKindLabel, type ModelPart } from "~/photos/parts";
import { mayAddPhoto } from "~/photos/permissions";
import type { PhotoView } from "~/photos/types";

/** Every photo of the rig, grouped by the part of the model (or the place) it shows. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const data = await loadRigPhotos(db, access);
  return { rig: access.rig, ...data };
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.rig.name} photos · Tilldawn` : "Tilldawn" }];
}

type Group = { key: string; title: string; subtitle: string; target: { partId?: string; place?: string }; photos: PhotoView[] };

function groupPhotos(photos: PhotoView[], parts: ModelPart[]): Group[] {
  const partById = new Map(parts.map((p) => [p.id, p]));
  const groups = new Map<string, Group>();
  for (const photo of photos) {
    if (photo.readingId) continue;
    const key = photo.partId ? `part:${photo.partId}` : `place:${photo.place.toLowerCase()}`;
    let group = groups.get(key);
    if (!group) {
      const part = photo.partId ? partById.get(photo.partId) : undefined;
      group = photo.partId
        ? {
            key,
            title: part?.name ?? photo.partId,
            subtitle: part ? [partKindLabel[part.kind] ?? part.kind, part.location].filter(Boolean).join(" · ") : "No longer in the as-built model",
            target: { partId: photo.partId },
            photos: [],
          }
        : { key, title: photo.place, subtitle: "Place", target: { place: photo.place }, photos: [] };
      groups.set(key, group);
    }
    group.photos.push(photo);
  }
  for (const g of groups.values()) g.photos.sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  return [...groups.values()].sort((a, b) => a.title.localeCompare(b.title));
}

export default function RigPhotosPage({ loaderData }: Route.ComponentProps) {
  const { rig, parts, me, available } = loaderData;
  const [photos, setPhotos] = useState(loaderData.photos);
  // Groups stay on the page once shown, even when their last photo is deleted, so the strip
  // (and its spoken "Photo deleted.") stays where the person is.
  const [shown, setShown] = useState(loaderData.photos);
  useEffect(() => {
    setShown((before) => {
      const added = photos.filter((p) => !before.some((b) => b.id === p.id));
      return added.length ? [...before, ...added] : before;
    });
  }, [photos]);
  const groups = useMemo(() => {
    const current = new Map(photos.map((p) => [p.id, p]));
    return groupPhotos(shown, parts).map((g) => ({ ...g, photos: g.photos.filter((p) => current.has(p.id)) }));
  }, [photos, shown, parts]);
  const readingPhotos = photos.filter((p) => p.readingId);
  const [partId, setPartId] = useState("");
  const [place, setPlace] = useState("");
  const canAdd = available && mayAddPhoto(me.role, "part");
  const newTarget = partId ? { partId, ...(place.trim() ? { place: place.trim() } : {}) } : place.trim() ? { place: place.trim() } : null;
  const newTitle = partId ? (parts.find((p) => p.id === partId)?.name ?? partId) : place.trim();

  // A strip's change (upload or delete) replaces that group's photos in the page's list.
  const replaceGroup = (group: Pick<Group, "target">) => (next: PhotoView[]) => {
    setPhotos((all) => {
      const inGroup = (p: PhotoView) =>
        !p.readingId && (group.target.partId ? p.partId === group.target.partId : !p.partId && p.place.toLowerCase() === group.target.place?.toLowerCase());
      return [...next, ...all.filter((p) => !inGroup(p) && !next.some((n) => n.id === p.id))];
    });
  };

  return (
    <div className="space-y-6">
      <header>
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Rig</p>
        <h1 className="text-3xl font-bold">{rig.name}: photos</h1>
        <p className="text-night-300">
          Pictures of the wiring, by part of the model or place in the rig.{" "}
          {me.role === "owner" ? "You can add and delete them." : "Owners add them; everyone on the rig sees them."}
        </p>
      </header>

      {canAdd ? (
        <section aria-labelledby="add-photo" className="space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4">
          <h2 id="add-photo" className="text-xl font-bold">Add photos</h2>
          <div className="grid gap-3 md:grid-cols-2">
            <label className="block space-y-1 font-bold">
              Part of the model
              <select value={partId} onChange={(e) => setPartId(e.currentTarget.value)} className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-base">
                <option value="">No part (a place only)</option>
                {parts.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.name} ({partKindLabel[p.kind] ?? p.kind})
                  </option>
                ))}
              </select>
            </label>
            <label className="block space-y-1 font-bold">
              Place in the rig (optional with a part)
              <input
                value={place}
                onChange={(e) => setPlace(e.currentTarget.value)}
                maxLength={PLACE_MAX}
                placeholder="e.g. battery compartment"
                className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-base"
              />
            </label>
          </div>
          {newTarget ? (
            <PhotoStrip
              key={JSON.stringify(newTarget)}
              rigId={rig.id}
              target={newTarget}
              title={`New photos of ${newTitle}`}
              photos={[]}
              me={me}
              available={available}
              emptyText="Choose pictures to add them here and to the list below."
              onChange={(next) => setPhotos((all) => [...next.filter((n) => !all.some((p) => p.id === n.id)), ...all])}
            />
          ) : (
            <p className="text-night-300">Choose a part or type a place first.</p>
          )}
        </section>
      ) : null}

      {!available ? <p className="rounded-2xl border border-night-600 p-4 text-night-200">Photos are not set up on this server.</p> : null}

      {groups.length === 0 ? (
        <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">
          No photos of this rig yet.{canAdd ? " Add one above: a fuse panel or the battery compartment is a good start." : ""}
        </p>
      ) : (
        <ul className="space-y-4" aria-label="Photos by part">
          {groups.map((group) => (
            <li key={group.key} className="rounded-2xl border border-night-700 bg-night-900 p-4">
              <p className="text-sm text-night-300">{group.subtitle}</p>
              <PhotoStrip
                rigId={rig.id}
                target={group.target}
                title={group.title}
                headingLevel={2}
                photos={group.photos}
                me={me}
                available={available}
                onChange={replaceGroup(group)}
              />
            </li>
          ))}
        </ul>
      )}

      {readingPhotos.length ? (
        <section aria-labelledby="reading-photos" className="space-y-2">
          <h2 id="reading-photos" className="text-xl font-bold">With logbook readings</h2>
          <ul className="space-y-1">
            {[...new Set(readingPhotos.map((p) => p.readingId!))].map((readingId) => (
              <li key={readingId}>
                <Link to={`/rigs/${rig.id}/log/${readingId}`} className="inline-flex min-h-11 items-center font-bold text-night-300 underline">
                  Reading with {readingPhotos.filter((p) => p.readingId === readingId).length} photo(s)
                </Link>
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <Link to={`/rigs/${rig.id}/model`} className="inline-flex min-h-12 items-center rounded-xl border border-night-600 px-4 font-bold">
        Rig as built
      </Link>
    </div>
  );
}
