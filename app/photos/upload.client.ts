/**
 * Sends one picture to POST /api/rigs/:rigId/photos with XMLHttpRequest, whose upload events
 * give the progress bar its numbers (fetch has none for request bodies). Abortable.
 */
import type { PhotoView } from "~/photos/types";

export type PhotoTargetQuery = { partId?: string; place?: string; readingId?: string };

export type UploadHandle = { promise: Promise<PhotoView>; abort: () => void };

export class UploadError extends Error {
  override name = "UploadError";
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

export function uploadPhoto(
  rigId: string,
  file: Blob,
  options: PhotoTargetQuery & { caption?: string; keepLocation?: boolean; onProgress?: (fraction: number) => void },
): UploadHandle {
  const query = new URLSearchParams();
  for (const key of ["partId", "place", "readingId", "caption"] as const) {
    const value = options[key];
    if (value) query.set(key, value);
  }
  if (options.keepLocation) query.set("keepLocation", "1");
  const xhr = new XMLHttpRequest();
  const promise = new Promise<PhotoView>((resolve, reject) => {
    xhr.open("POST", `/api/rigs/${rigId}/photos?${query}`);
    xhr.responseType = "json";
    xhr.setRequestHeader("content-type", file.type || "application/octet-stream");
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) options.onProgress?.(e.loaded / e.total);
    };
    xhr.onload = () => {
      const body = xhr.response as { photo?: PhotoView; error?: { code: string; message: string } } | null;
      if (xhr.status === 201 && body?.photo) {
        options.onProgress?.(1);
        resolve(body.photo);
      } else {
        reject(new UploadError(xhr.status, body?.error?.code ?? "upload_failed", body?.error?.message ?? `The server answered ${xhr.status}.`));
      }
    };
    xhr.onerror = () => reject(new UploadError(0, "network", "The connection dropped. Nothing was kept; try again when you have signal."));
    xhr.onabort = () => reject(new UploadError(0, "aborted", "Upload cancelled. Nothing was kept."));
    xhr.send(file);
  });
  return { promise, abort: () => xhr.abort() };
}

export async function deletePhotoRequest(rigId: string, photoId: string): Promise<void> {
  const res = await fetch(`/api/rigs/${rigId}/photos/${photoId}`, { method: "DELETE" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: { code: string; message: string } } | null;
    throw new UploadError(res.status, body?.error?.code ?? "delete_failed", body?.error?.message ?? `The server answered ${res.status}.`);
  }
}
