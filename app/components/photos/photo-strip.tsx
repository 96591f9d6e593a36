/**
 * A row of photo thumbnails with adding, an upload progress bar per picture, opening and
 * deleting — for any part of the model, a place, or a logbook reading:
 *
 *   <PhotoStrip rigId={rigId} target={{ partId: "fuse-panel" }} title="Fuse panel" {...loadPartPhotos(...)} />
 *   <PhotoStrip rigId={rigId} target={{ readingId }} title="Photos of this reading" />   // fetches its own list
 *
 * Keyboard: every thumbnail is a button that opens the photo in a dialog (Escape closes);
 * "Add photos" is a labelled file input. Screen readers hear progress from the <progress>
 * elements and the outcome of each upload and delete from a polite live region. In night mode
 * the pictures are tinted red so they do not spoil night vision.
 */
import { useEffect, useId, useRef, useState, type ImgHTMLAttributes } from "react";
import type { Role } from "~/auth/roles";
import { Button } from "~/components/ui/button";
import { Sheet } from "~/components/ui/sheet";
import { cn } from "~/lib/cn";
import { CAPTION_MAX, PHOTO_ACCEPT, PHOTO_MAX_BYTES } from "~/photos/limits";
import { mayAddPhoto, mayDeletePhoto, mayKeepLocation } from "~/photos/permissions";
import type { PhotoView } from "~/photos/types";
import { deletePhotoRequest, uploadPhoto, type PhotoTargetQuery, type UploadHandle } from "~/photos/upload.client";

export type PhotoStripProps = {
  rigId: string;
  /** Where new photos go and which photos are shown when the strip fetches its own list. */
  target: PhotoTargetQuery;
  title: string;
  /** Headings level for the title (default h3). */
  headingLevel?: 2 | 3 | 4;
  photos?: PhotoView[];
  me?: { userId: string; role: Role };
  available?: boolean;
  emptyText?: string;
  onChange?: (photos: PhotoView[]) => void;
};

type Upload = { key: string; name: string; preview: string; fraction: number; error: string | null; handle: UploadHandle | null };

/**
 * A picture that turns red-only in night mode: greyscale, then multiplied by red, so no green or
 * blue light reaches the eye.
 */
function NightSafeImg({ className, wrapperClassName, alt, ...props }: ImgHTMLAttributes<HTMLImageElement> & { wrapperClassName?: string }) {
  return (
    <span className={cn("relative block overflow-hidden rounded-lg", wrapperClassName)}>
      <img alt={alt} className={cn("block [html.night_&]:brightness-75 [html.night_&]:grayscale", className)} {...props} />
      <span aria-hidden className="pointer-events-none absolute inset-0 hidden bg-[#ff0000] mix-blend-multiply [html.night_&]:block" />
    </span>
  );
}

export function photoLabel(photo: PhotoView, index: number): string {
  return photo.caption || photo.place || `Photo ${index + 1}`;
}

function fmtBytes(n: number): string {
  return n >= 1024 * 1024 ? `${(n / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(n / 1024))} KB`;
}

export function PhotoStrip({ rigId, target, title, headingLevel = 3, photos: given, me: givenMe, available: givenAvailable, emptyText, onChange }: PhotoStripProps) {
  const [photos, setPhotos] = useState<PhotoView[] | null>(given ?? null);
  const [me, setMe] = useState(givenMe ?? null);
  const [available, setAvailable] = useState(givenAvailable ?? true);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [uploads, setUploads] = useState<Upload[]>([]);
  const [announce, setAnnounce] = useState("");
  const [open, setOpen] = useState<PhotoView | null>(null);
  const [deleting, setDeleting] = useState(false);
  const [deleteError, setDeleteError] = useState<string | null>(null);
  const [caption, setCaption] = useState("");
  const [keepLocation, setKeepLocation] = useState(false);
  const headingId = useId();
  const inputId = useId();
  const inputRef = useRef<HTMLInputElement>(null);
  const Heading = `h${headingLevel}` as const;
  const targetKey = JSON.stringify(target);

  // Photos handed in by the page win whenever the page's list changes.
  useEffect(() => {
    if (given) setPhotos(given);
  }, [given]);

  useEffect(() => {
    if (given) return;
    let live = true;
    const query = new URLSearchParams(Object.entries(target).filter((e): e is [string, string] => Boolean(e[1])));
    fetch(`/api/rigs/${rigId}/photos?${query}`, { headers: { accept: "application/json" } })
      .then(async (res) => {
        const body = (await res.json()) as { photos?: PhotoView[]; me?: { userId: string; role: Role }; available?: boolean; error?: { message: string } };
        if (!live) return;
        if (!res.ok || !body.photos) throw new Error(body.error?.message ?? `The server answered ${res.status}.`);
        setPhotos(body.photos);
        setMe(body.me ?? null);
        setAvailable(body.available ?? true);
      })
      .catch((error: Error) => {
        if (live) setLoadError(error instanceof TypeError ? "Photos need a connection." : error.message);
      });
    return () => {
      live = false;
    };
    // targetKey stands for target.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [rigId, targetKey, given]);

  const update = (next: PhotoView[]) => {
    setPhotos(next);
    onChange?.(next);
  };
  const kind = target.readingId ? "reading" : "part";
  const canAdd = available && mayAddPhoto(me?.role, kind);

  function patchUpload(key: string, patch: Partial<Upload>) {
    setUploads((list) => list.map((u) => (u.key === key ? { ...u, ...patch } : u)));
  }
  function dropUpload(key: string) {
    setUploads((list) => {
      const gone = list.find((u) => u.key === key);
      if (gone) URL.revokeObjectURL(gone.preview);
      return list.filter((u) => u.key !== key);
    });
  }

  function start(files: FileList | null) {
    for (const file of Array.from(files ?? [])) {
      const key = crypto.randomUUID();
      const preview = URL.createObjectURL(file);
      if (file.size > PHOTO_MAX_BYTES) {
        setUploads((list) => [...list, { key, name: file.name, preview, fraction: 0, handle: null, error: `${file.name} is ${fmtBytes(file.size)}; photos can be up to ${fmtBytes(PHOTO_MAX_BYTES)}.` }]);
        setAnnounce(`${file.name} is too large to upload.`);
        continue;
      }
      const handle = uploadPhoto(rigId, file, {
        ...target,
        caption: caption.trim() || undefined,
        keepLocation: keepLocation && mayKeepLocation(me?.role),
        onProgress: (fraction) => patchUpload(key, { fraction }),
      });
      setUploads((list) => [...list, { key, name: file.name, preview, fraction: 0, error: null, handle }]);
      setAnnounce(`Uploading ${file.name}.`);
      handle.promise
        .then((photo) => {
          setPhotos((list) => {
            const next = [photo, ...(list ?? [])];
            onChange?.(next);
            return next;
          });
          dropUpload(key);
          setAnnounce(`${file.name} uploaded.`);
        })
        .catch((error: Error) => {
          patchUpload(key, { error: error.message, handle: null });
          setAnnounce(`${file.name} was not uploaded: ${error.message}`);
        });
    }
    setCaption("");
    if (inputRef.current) inputRef.current.value = "";
  }

  async function remove(photo: PhotoView) {
    if (!window.confirm("Delete this photo? This cannot be undone.")) return;
    setDeleting(true);
    setDeleteError(null);
    try {
      await deletePhotoRequest(rigId, photo.id);
      update((photos ?? []).filter((p) => p.id !== photo.id));
      setOpen(null);
      setAnnounce("Photo deleted.");
    } catch (error) {
      setDeleteError((error as Error).message);
    } finally {
      setDeleting(false);
    }
  }

  const list = photos ?? [];
  return (
    <section aria-labelledby={headingId} className="space-y-2" data-photo-strip>
      <Heading id={headingId} className="font-bold">
        {title}
        {photos ? <span className="ml-2 font-normal text-night-300 tabular">({list.length})</span> : null}
      </Heading>
      <p aria-live="polite" role="status" className="sr-only">
        {announce}
      </p>
      {loadError ? <p className="text-night-300">{loadError}</p> : null}
      {!photos && !loadError ? <p className="text-night-300">Loading photos…</p> : null}
      {photos && list.length === 0 && uploads.length === 0 ? <p className="text-night-300">{emptyText ?? "No photos yet."}</p> : null}
      {list.length || uploads.length ? (
        <ul className="flex gap-2 overflow-x-auto pb-1" aria-label={`${title}: photos`}>
          {uploads.map((u) => (
            <li key={u.key} className="w-32 shrink-0 space-y-1 rounded-xl border border-night-600 bg-night-900 p-1" data-upload>
              <NightSafeImg src={u.preview} alt="" className="h-24 w-full object-cover opacity-70" />
              {u.error ? (
                <>
                  <p role="alert" className="text-xs text-ember-300">{u.error}</p>
                  <button type="button" onClick={() => dropUpload(u.key)} className="min-h-11 w-full rounded-lg bg-night-800 text-sm font-bold">
                    Dismiss
                  </button>
                </>
              ) : (
                <>
                  <progress max={100} value={Math.round(u.fraction * 100)} aria-label={`Uploading ${u.name}`} className="h-2 w-full accent-dawn-500" />
                  <p className="text-xs text-night-200 tabular">{u.fraction >= 1 ? "Processing…" : `${Math.round(u.fraction * 100)} %`}</p>
                  <button type="button" onClick={() => u.handle?.abort()} className="min-h-11 w-full rounded-lg bg-night-800 text-sm font-bold">
                    Cancel
                  </button>
                </>
              )}
            </li>
          ))}
          {list.map((photo, i) => (
            <li key={photo.id} className="shrink-0">
              <button
                type="button"
                onClick={() => {
                  setDeleteError(null);
                  setOpen(photo);
                }}
                className="block rounded-xl border border-night-600 p-0.5 hover:border-dawn-500"
                aria-label={`Open photo: ${photoLabel(photo, i)}`}
              >
                <NightSafeImg
                  src={photo.thumbUrl}
                  alt={photoLabel(photo, i)}
                  loading="lazy"
                  width={Math.round((photo.width / Math.max(photo.width, photo.height)) * 128)}
                  height={Math.round((photo.height / Math.max(photo.width, photo.height)) * 128)}
                  className="h-24 w-auto object-cover"
                />
              </button>
            </li>
          ))}
        </ul>
      ) : null}
      {canAdd ? (
        <div className="space-y-2">
          <div className="flex flex-wrap items-start gap-2">
            <label
              className="inline-flex min-h-12 cursor-pointer items-center rounded-xl bg-dawn-500 px-4 font-bold text-night-950 focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-dawn-400 hover:bg-dawn-400"
              htmlFor={inputId}
            >
              Add photos
              <input
                id={inputId}
                ref={inputRef}
                type="file"
                accept={PHOTO_ACCEPT}
                multiple
                className="sr-only"
                onChange={(e) => start(e.currentTarget.files)}
                aria-describedby={`${inputId}-help`}
              />
            </label>
            <details className="min-w-0 flex-1 rounded-xl border border-night-700">
              <summary className="flex min-h-12 cursor-pointer items-center px-3 font-bold text-night-200">
                {mayKeepLocation(me?.role) ? "Caption and location" : "Caption"}
                {caption || keepLocation ? <span className="ml-2 text-sm font-normal text-dawn-300">(set)</span> : null}
              </summary>
              <div className="space-y-2 px-3 pb-3">
                <label className="block text-sm font-bold">
                  Caption for the next photo (optional)
                  <input
                    value={caption}
                    onChange={(e) => setCaption(e.currentTarget.value)}
                    maxLength={CAPTION_MAX}
                    className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-base font-normal"
                  />
                </label>
                {mayKeepLocation(me?.role) ? (
                  <label className="flex min-h-12 items-center gap-2 text-sm">
                    <input type="checkbox" checked={keepLocation} onChange={(e) => setKeepLocation(e.currentTarget.checked)} className="size-5 accent-dawn-500" />
                    Keep the photo’s location (GPS) in the file
                  </label>
                ) : null}
              </div>
            </details>
          </div>
          <p id={`${inputId}-help`} className="text-xs text-night-300">
            JPEG, PNG or WebP up to {fmtBytes(PHOTO_MAX_BYTES)}. The location a camera writes into a photo is removed{mayKeepLocation(me?.role) ? " unless you keep it" : ""}.
          </p>
        </div>
      ) : null}
      {!available ? <p className="text-night-300">Photos are not set up on this server.</p> : null}
      <Sheet open={open !== null} onClose={() => setOpen(null)} title={open ? photoLabel(open, list.indexOf(open)) : "Photo"}>
        {open ? (
          <div className="space-y-3">
            <NightSafeImg
              src={open.url}
              alt={photoLabel(open, list.indexOf(open))}
              width={open.width}
              height={open.height}
              wrapperClassName="rounded-xl"
              className="h-auto max-h-[60dvh] w-full object-contain"
            />
            <p className="text-sm text-night-200">
              {open.place ? `${open.place} · ` : ""}
              {open.width} × {open.height} px, {fmtBytes(open.bytes)}
              {open.authorName ? ` · added by ${open.authorName}` : ""} · {new Date(open.createdAt).toLocaleString()}
              {open.keptLocation ? " · location kept" : ""}
            </p>
            <a href={open.url} target="_blank" rel="noreferrer" className="inline-flex min-h-12 items-center font-bold text-night-300 underline">
              Open full size
            </a>
            {me && mayDeletePhoto(me.role, open, me.userId) ? (
              <Button variant="danger" className="w-full" disabled={deleting} onClick={() => void remove(open)}>
                {deleting ? "Deleting…" : "Delete photo"}
              </Button>
            ) : null}
            {deleteError ? <p role="alert" className="font-bold text-ember-300">{deleteError}</p> : null}
          </div>
        ) : null}
      </Sheet>
    </section>
  );
}
