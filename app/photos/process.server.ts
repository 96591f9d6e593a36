/**
 * From uploaded bytes to what is stored: the body read with a byte limit, the type told by the
 * content (never by the name or the Content-Type header), the picture re-encoded without its
 * metadata (EXIF, including the GPS location, is dropped unless kept on purpose) and a WebP
 * thumbnail.
 */
import { fileTypeFromBuffer } from "file-type";
import sharp from "sharp";
import { joinChunks } from "~/lib/http";
import { PHOTO_MAX_BYTES, THUMB_MAX_PX, type PhotoMime } from "./limits";

export class PhotoInputError extends Error {
  override name = "PhotoInputError";
  constructor(
    readonly status: 400 | 413 | 415,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

const tooLarge = () =>
  new PhotoInputError(413, "photo_too_large", `Photos can be up to ${PHOTO_MAX_BYTES / 1024 / 1024} MB. Choose a smaller picture.`);

/**
 * Reads a request body to the end, refusing it (413) as soon as it passes `limit` bytes, and
 * answering 400 when the sender stops half-way. Nothing is stored before the whole body is here.
 */
export async function readBodyWithLimit(request: Request, limit = PHOTO_MAX_BYTES): Promise<Uint8Array> {
  const declared = Number(request.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > limit) throw tooLarge();
  if (!request.body) throw new PhotoInputError(400, "photo_missing", "Send the picture as the request body.");
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  const aborted = new Promise<never>((_, reject) => {
    const fail = () => reject(new PhotoInputError(400, "upload_interrupted", "The upload stopped before the whole picture arrived. Nothing was kept."));
    if (request.signal.aborted) fail();
    request.signal.addEventListener("abort", fail, { once: true });
  });
  aborted.catch(() => undefined);
  try {
    for (;;) {
      const { done, value } = await Promise.race([reader.read(), aborted]);
      if (done) break;
      total += value.byteLength;
      if (total > limit) {
        await reader.cancel().catch(() => undefined);
        throw tooLarge();
      }
      chunks.push(value);
    }
  } catch (error) {
    if (error instanceof PhotoInputError) throw error;
    throw new PhotoInputError(400, "upload_interrupted", "The upload stopped before the whole picture arrived. Nothing was kept.");
  }
  if (total === 0) throw new PhotoInputError(400, "photo_missing", "The picture is empty.");
  return joinChunks(chunks, total);
}

export type DetectedType = { mime: PhotoMime; ext: "jpg" | "png" | "webp" };

/** The picture's type from its first bytes. HEIC and anything else are refused with 415. */
export async function detectPhotoType(bytes: Uint8Array): Promise<DetectedType> {
  const found = await fileTypeFromBuffer(bytes);
  if (found?.mime === "image/jpeg") return { mime: "image/jpeg", ext: "jpg" };
  if (found?.mime === "image/png") return { mime: "image/png", ext: "png" };
  if (found?.mime === "image/webp") return { mime: "image/webp", ext: "webp" };
  if (found && (found.mime === "image/heic" || found.mime === "image/heif" || found.ext === "heic")) {
    throw new PhotoInputError(
      415,
      "photo_heic_unsupported",
      "This is a HEIC photo, which this server cannot read. Share it as JPEG (phones usually offer “Most compatible” or convert when you pick the photo in the browser).",
    );
  }
  throw new PhotoInputError(
    415,
    "photo_type_unsupported",
    found ? `This file is ${found.mime}, not a photo Tilldawn keeps. Use JPEG, PNG or WebP.` : "This file is not a JPEG, PNG or WebP picture.",
  );
}

export type ProcessedPhoto = DetectedType & {
  original: Uint8Array;
  thumb: Uint8Array;
  width: number;
  height: number;
};

/**
 * Re-encodes the picture (turned upright from its EXIF orientation) without metadata unless
 * `keepLocation`, and makes a thumbnail of at most THUMB_MAX_PX on its longer side.
 */
export async function processPhoto(bytes: Uint8Array, options: { keepLocation: boolean }): Promise<ProcessedPhoto> {
  const type = await detectPhotoType(bytes);
  try {
    let pipeline = sharp(bytes, { failOn: "error", limitInputPixels: 100_000_000 }).rotate();
    if (options.keepLocation) pipeline = pipeline.keepMetadata();
    else pipeline = pipeline.keepIccProfile();
    const encoded =
      type.mime === "image/jpeg"
        ? pipeline.jpeg({ quality: 90 })
        : type.mime === "image/png"
          ? pipeline.png()
          : pipeline.webp({ quality: 90, effort: 1 });
    const { data: original, info } = await encoded.toBuffer({ resolveWithObject: true });
    const thumb = await sharp(original)
      .resize(THUMB_MAX_PX, THUMB_MAX_PX, { fit: "inside", withoutEnlargement: true })
      .webp({ quality: 78 })
      .toBuffer();
    return { ...type, original: new Uint8Array(original), thumb: new Uint8Array(thumb), width: info.width, height: info.height };
  } catch (error) {
    if (error instanceof PhotoInputError) throw error;
    throw new PhotoInputError(415, "photo_unreadable", "The picture could not be read: it may be damaged or cut short.");
  }
}
