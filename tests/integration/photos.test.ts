/**
 * Photos against the real PostgreSQL and the local S3 fake (scripts/fakes.ts, started here on a
 * free loopback port with its own folder): type by content, the 15 MB limit while reading,
 * interrupted and failed uploads leaving nothing, delete, EXIF location, the orphan sweep, and
 * who may do what.
 */
import { mkdir, mkdtemp, rm } from "node:fs/promises";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { eq } from "drizzle-orm";
import exifReader from "exif-reader";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { photos, readings, rigMembers } from "~/db/schema";
import { sweepOrphanPhotos } from "~/photos/cleanup.server";
import { storePhoto } from "~/photos/upload.server";
import { createRig } from "~/repos/rigs.server";
import * as photosRoute from "~/routes/api.rigs.photos";
import * as photoRoute from "~/routes/api.rigs.photos.$photoId";
import { createS3PhotoStore, photoKeys, type PhotoStore } from "~/storage/photo-store.server";
import { FAKE_S3_BUCKET, FAKE_S3_CREDENTIALS } from "~/env.server";
import { juniperModel } from "../fixtures/juniper";
import { startS3Fake, type RunningFake } from "../../scripts/fakes";
import { makeUser, sessionCookieFor, TEST_ORIGIN } from "./auth";
import { openTestDb } from "./db";

const root = fileURLToPath(new URL("../..", import.meta.url));
const { db, pool } = openTestDb();
let fake: RunningFake;
let dir: string;
let store: PhotoStore;
let rigId: string;
let otherRigId: string;
let readingId: string;
let otherReadingId: string;
const cookies = {} as Record<"owner" | "crew" | "crew2" | "guest" | "stranger", string>;
const ids = {} as Record<keyof typeof cookies, string>;

beforeAll(async () => {
  await mkdir(path.join(root, ".data/test"), { recursive: true });
  dir = await mkdtemp(path.join(root, ".data/test/s3-photos-"));
  fake = await startS3Fake({ port: 0, directory: dir });
  // The app's store (getPhotoStore) reads these when the routes first run (the environment is read lazily).
  process.env.PHOTOS_S3_PORT = String(fake.port);
  delete process.env.PHOTOS_S3_BUCKET;
  delete process.env.PHOTOS_S3_ENDPOINT;
  store = createS3PhotoStore({
    bucket: FAKE_S3_BUCKET,
    endpoint: `http://127.0.0.1:${fake.port}`,
    region: "us-east-1",
    credentials: { ...FAKE_S3_CREDENTIALS },
    forcePathStyle: true,
    fake: true,
  });

  const people = {
    owner: await makeUser(db, "Ada"),
    crew: await makeUser(db, "Sam"),
    crew2: await makeUser(db, "Kit"),
    guest: await makeUser(db, "Noor"),
    stranger: await makeUser(db, "Stranger"),
  };
  const { rig } = await createRig(db, { name: "Photo van", ownerId: people.owner.id, document: juniperModel });
  const { rig: other } = await createRig(db, { name: "Other van", ownerId: people.stranger.id, document: juniperModel });
  rigId = rig.id;
  otherRigId = other.id;
  await db.insert(rigMembers).values([
    { rigId, userId: people.crew.id, role: "crew" },
    { rigId, userId: people.crew2.id, role: "crew" },
    { rigId, userId: people.guest.id, role: "guest" },
  ]);
  readingId = crypto.randomUUID();
  otherReadingId = crypto.randomUUID();
  await db.insert(readings).values([
    { id: readingId, rigId, authorId: people.crew.id, takenAt: new Date(), bankVoltageV: 13.2 },
    { id: otherReadingId, rigId: otherRigId, authorId: people.stranger.id, takenAt: new Date(), bankVoltageV: 13.1 },
  ]);
  for (const [who, user] of Object.entries(people) as Array<[keyof typeof cookies, { id: string }]>) {
    ids[who] = user.id;
    cookies[who] = await sessionCookieFor(db, user.id);
  }
});

afterAll(async () => {
  await fake?.close();
  await pool.end();
  if (dir) await rm(dir, { recursive: true, force: true });
});

/* ----------------------------------------------------------------- helpers */

async function png(width = 64, height = 48): Promise<Uint8Array> {
  return new Uint8Array(await sharp({ create: { width, height, channels: 3, background: { r: 30, g: 60, b: 140 } } }).png().toBuffer());
}

/** A JPEG whose EXIF holds a GPS position (38° 30' N, 109° 36' W: invented, Juniper's home). */
async function jpegWithLocation(): Promise<Uint8Array> {
  return new Uint8Array(
    await sharp({ create: { width: 80, height: 60, channels: 3, background: { r: 200, g: 120, b: 20 } } })
      .withExif({
        IFD0: { Make: "Tilldawn test" },
        IFD3: { GPSLatitudeRef: "N", GPSLatitude: "38/1 30/1 0/1", GPSLongitudeRef: "W", GPSLongitude: "109/1 36/1 0/1" },
      })
      .jpeg()
      .toBuffer(),
  );
}

async function gpsOf(bytes: Uint8Array): Promise<unknown> {
  const { exif } = await sharp(bytes).metadata();
  if (!exif) return undefined;
  const parsed = exifReader(exif) as { GPSInfo?: Record<string, unknown> };
  return parsed.GPSInfo?.GPSLatitude;
}

type Body = BodyInit | ReadableStream<Uint8Array> | Uint8Array;

function uploadRequest(
  who: keyof typeof cookies | null,
  query: Record<string, string>,
  body: Body,
  options: { contentType?: string; headers?: Record<string, string>; signal?: AbortSignal; rig?: string } = {},
): Request {
  const headers = new Headers({ origin: TEST_ORIGIN, "content-type": options.contentType ?? "image/jpeg", ...options.headers });
  if (who) headers.set("cookie", cookies[who]);
  const url = new URL(`/api/rigs/${options.rig ?? rigId}/photos?${new URLSearchParams(query)}`, TEST_ORIGIN);
  return new Request(url, { method: "POST", headers, body: body as BodyInit, signal: options.signal, duplex: "half" } as RequestInit);
}

async function call(fn: (args: never) => unknown, request: Request, params: Record<string, string>): Promise<Response> {
  try {
    const result = await (fn as (a: { request: Request; params: Record<string, string>; context: unknown }) => unknown)({ request, params, context: {} });
    return result as Response;
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}

async function upload(who: keyof typeof cookies | null, query: Record<string, string>, body: Body, options: Parameters<typeof uploadRequest>[3] = {}) {
  const res = await call(photosRoute.action, uploadRequest(who, query, body, options), { rigId: options.rig ?? rigId });
  const json = (await res.json()) as { photo?: { id: string; mime: string; url: string; thumbUrl: string; width: number }; error?: { code: string; message: string } };
  return { status: res.status, ...json };
}

function photoRequest(who: keyof typeof cookies | null, photoId: string, init: { method?: string; query?: string; form?: Record<string, string> } = {}) {
  const headers = new Headers();
  if (who) headers.set("cookie", cookies[who]);
  if (init.method && init.method !== "GET") headers.set("origin", TEST_ORIGIN);
  let body: BodyInit | undefined;
  if (init.form) {
    headers.set("content-type", "application/x-www-form-urlencoded");
    body = new URLSearchParams(init.form);
  }
  return new Request(new URL(`/api/rigs/${rigId}/photos/${photoId}${init.query ?? ""}`, TEST_ORIGIN), { method: init.method ?? "GET", headers, body });
}

async function getPicture(who: keyof typeof cookies | null, photoId: string, query = "") {
  return call(photoRoute.loader, photoRequest(who, photoId, { query }), { rigId, photoId });
}

async function deletePhoto(who: keyof typeof cookies | null, photoId: string) {
  return call(photoRoute.action, photoRequest(who, photoId, { method: "DELETE" }), { rigId, photoId });
}

async function objectsOfRig(id = rigId): Promise<string[]> {
  const keys: string[] = [];
  for await (const o of store.list(`photos/${id}/`)) keys.push(o.key);
  return keys.sort();
}

async function rowsOfRig(id = rigId) {
  return db.select().from(photos).where(eq(photos.rigId, id));
}

/** A body that sends `bytes` in 64 KB chunks, with no Content-Length (the limit must hold while reading). */
function chunked(total: number, options: { failAfter?: number } = {}): ReadableStream<Uint8Array> {
  let sent = 0;
  const chunk = new Uint8Array(64 * 1024).fill(0xff);
  return new ReadableStream({
    pull(controller) {
      if (options.failAfter !== undefined && sent >= options.failAfter) {
        controller.error(new Error("connection reset by the phone"));
        return;
      }
      if (sent >= total) {
        controller.close();
        return;
      }
      sent += chunk.byteLength;
      controller.enqueue(chunk);
    },
  });
}

/* ------------------------------------------------------------------- tests */

describe("Uploading photos", () => {
  test("a PNG sent as a .jpg (image/jpeg) is kept as a PNG, with a WebP thumbnail, under the part", async () => {
    const before = await objectsOfRig();
    const answer = await upload("owner", { partId: "fuse-panel", place: "Behind the passenger seat", caption: "Fuse panel, lid off" }, await png(640, 480), {
      contentType: "image/jpeg",
      headers: { "x-file-name": "panel.jpg" },
    });
    expect(answer.status).toBe(201);
    expect(answer.photo?.mime).toBe("image/png");
    const [row] = await db.select().from(photos).where(eq(photos.id, answer.photo!.id));
    expect(row).toMatchObject({ partId: "fuse-panel", partKind: "bus", place: "Behind the passenger seat", mime: "image/png", width: 640, height: 480 });
    expect(row!.objectKey.endsWith("/original.png")).toBe(true);
    const after = await objectsOfRig();
    expect(after.filter((k) => !before.includes(k))).toEqual([row!.objectKey, row!.thumbKey].sort());

    const full = await getPicture("guest", row!.id);
    expect(full.status).toBe(200);
    expect(full.headers.get("content-type")).toBe("image/png");
    expect((await sharp(new Uint8Array(await full.arrayBuffer())).metadata()).format).toBe("png");
    const thumb = await getPicture("guest", row!.id, "?size=thumb");
    const thumbMeta = await sharp(new Uint8Array(await thumb.arrayBuffer())).metadata();
    expect(thumbMeta.format).toBe("webp");
    expect(Math.max(thumbMeta.width!, thumbMeta.height!)).toBe(480);
  });

  test("a text file named .jpg is refused (415) and leaves no row and no object", async () => {
    const before = { rows: (await rowsOfRig()).length, objects: await objectsOfRig() };
    const answer = await upload("owner", { partId: "fuse-panel" }, new TextEncoder().encode("these are not the pixels you are looking for\n".repeat(50)), {
      contentType: "image/jpeg",
    });
    expect(answer.status).toBe(415);
    expect(answer.error?.code).toBe("photo_type_unsupported");
    expect((await rowsOfRig()).length).toBe(before.rows);
    expect(await objectsOfRig()).toEqual(before.objects);
  });

  test("a HEIC photo is refused with a message saying how to send it", async () => {
    // The ftyp box of a HEIC file (ISO/IEC 23008-12 brand "heic"), then filler.
    const heic = new Uint8Array(4096);
    heic.set([0, 0, 0, 0x18, ...new TextEncoder().encode("ftypheic"), 0, 0, 0, 0, ...new TextEncoder().encode("mif1heic")]);
    const answer = await upload("owner", { partId: "fuse-panel" }, heic, { contentType: "image/heic" });
    expect(answer.status).toBe(415);
    expect(answer.error?.code).toBe("photo_heic_unsupported");
    expect(answer.error?.message).toMatch(/JPEG/);
  });

  test("over 15 MB is refused with 413, whether the size is declared or only found while reading", async () => {
    const before = { rows: (await rowsOfRig()).length, objects: await objectsOfRig() };
    const limit = 15 * 1024 * 1024;
    const declared = await upload("owner", { partId: "fuse-panel" }, new Uint8Array(limit + 1), { headers: { "content-length": String(limit + 1) } });
    expect(declared.status).toBe(413);
    expect(declared.error?.code).toBe("photo_too_large");
    let pulled = 0;
    const body = chunked(40 * 1024 * 1024);
    const counting = body.pipeThrough(
      new TransformStream<Uint8Array, Uint8Array>({
        transform(chunk, controller) {
          pulled += chunk.byteLength;
          controller.enqueue(chunk);
        },
      }),
    );
    const streamed = await upload("owner", { partId: "fuse-panel" }, counting);
    expect(streamed.status).toBe(413);
    // It stopped reading soon after the limit, not at the end of the 40 MB.
    expect(pulled).toBeLessThan(limit + 2 * 1024 * 1024);
    expect((await rowsOfRig()).length).toBe(before.rows);
    expect(await objectsOfRig()).toEqual(before.objects);
  });

  test("an upload interrupted half-way (stream error or aborted request) leaves no row and no object", async () => {
    const before = { rows: (await rowsOfRig()).length, objects: await objectsOfRig() };
    const broken = await upload("owner", { partId: "fuse-panel" }, chunked(4 * 1024 * 1024, { failAfter: 1024 * 1024 }));
    expect(broken.status).toBe(400);
    expect(broken.error?.code).toBe("upload_interrupted");

    const controller = new AbortController();
    const stalled = new ReadableStream<Uint8Array>({
      start(c) {
        c.enqueue(new Uint8Array(1024));
        setTimeout(() => controller.abort(), 50);
      },
    });
    const aborted = await upload("owner", { partId: "fuse-panel" }, stalled, { signal: controller.signal });
    expect(aborted.status).toBe(400);
    expect(aborted.error?.code).toBe("upload_interrupted");
    expect((await rowsOfRig()).length).toBe(before.rows);
    expect(await objectsOfRig()).toEqual(before.objects);
  });

  test("a failure after the objects were stored removes them again (no orphan)", async () => {
    const before = await objectsOfRig();
    await expect(
      storePhoto(db, store, {
        rigId,
        authorId: ids.owner,
        target: { kind: "part", partId: "no-such-part", place: "" },
        caption: "",
        keepLocation: false,
        bytes: await png(),
      }),
    ).rejects.toThrow(/no part "no-such-part"/);
    expect(await objectsOfRig()).toEqual(before);
  });

  test("the camera's location is removed from the stored picture unless an owner keeps it", async () => {
    const source = await jpegWithLocation();
    expect(await gpsOf(source)).toBeDefined();
    const stripped = await upload("owner", { place: "Battery compartment" }, source);
    expect(stripped.status).toBe(201);
    const strippedBytes = new Uint8Array(await (await getPicture("owner", stripped.photo!.id)).arrayBuffer());
    expect(await gpsOf(strippedBytes)).toBeUndefined();

    const kept = await upload("owner", { place: "Battery compartment", keepLocation: "1" }, source);
    expect(kept.status).toBe(201);
    const keptBytes = new Uint8Array(await (await getPicture("owner", kept.photo!.id)).arrayBuffer());
    expect(await gpsOf(keptBytes)).toEqual([38, 30, 0]);

    const crewTries = await upload("crew", { readingId, keepLocation: "1" }, source);
    expect(crewTries.status).toBe(403);
  });
});

describe("Deleting photos", () => {
  test("delete removes the row and both objects; the picture then answers 404", async () => {
    const added = await upload("owner", { partId: "sw-main" }, await png());
    expect(added.status).toBe(201);
    const [row] = await db.select().from(photos).where(eq(photos.id, added.photo!.id));
    expect(await objectsOfRig()).toEqual(expect.arrayContaining([row!.objectKey, row!.thumbKey]));
    const res = await deletePhoto("owner", row!.id);
    expect(res.status).toBe(200);
    expect(await db.select().from(photos).where(eq(photos.id, row!.id))).toEqual([]);
    const left = await objectsOfRig();
    expect(left).not.toContain(row!.objectKey);
    expect(left).not.toContain(row!.thumbKey);
    expect((await getPicture("owner", row!.id)).status).toBe(404);
    expect((await deletePhoto("owner", row!.id)).status).toBe(404);
  });

  test("POST with intent=delete works too; without the intent it is a 400 and nothing is deleted", async () => {
    const added = await upload("owner", { partId: "sw-main" }, await png());
    const id = added.photo!.id;
    const bad = await call(photoRoute.action, photoRequest("owner", id, { method: "POST", form: { intent: "nothing" } }), { rigId, photoId: id });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { code: string } }).error.code).toBe("invalid_intent");
    expect((await db.select().from(photos).where(eq(photos.id, id))).length).toBe(1);
    const ok = await call(photoRoute.action, photoRequest("owner", id, { method: "POST", form: { intent: "delete" } }), { rigId, photoId: id });
    expect(ok.status).toBe(200);
    expect((await db.select().from(photos).where(eq(photos.id, id))).length).toBe(0);
  });
});

describe("The orphan sweep", () => {
  test("removes objects no row owns once they are past the grace period, and keeps every photo's objects", async () => {
    const kept = await upload("owner", { partId: "house", place: "Battery compartment" }, await png());
    const [keptRow] = await db.select().from(photos).where(eq(photos.id, kept.photo!.id));
    const orphan = photoKeys(rigId, crypto.randomUUID(), "jpg");
    await store.put(orphan.original, await png(), "image/jpeg");
    await store.put(orphan.thumb, await png(), "image/webp");
    const stray = `photos/${rigId}/not-a-photo.txt`;
    await store.put(stray, new TextEncoder().encode("left behind"), "text/plain");

    // Within the grace period an object might belong to an upload in progress: left alone.
    const early = await sweepOrphanPhotos(db, store);
    expect(early.removed).not.toContain(orphan.original);
    expect(await objectsOfRig()).toEqual(expect.arrayContaining([orphan.original, orphan.thumb, stray]));

    const later = await sweepOrphanPhotos(db, store, { now: new Date(Date.now() + 2 * 60 * 60 * 1000) });
    expect(later.removed).toEqual(expect.arrayContaining([orphan.original, orphan.thumb, stray]));
    const left = await objectsOfRig();
    expect(left).not.toContain(orphan.original);
    expect(left).not.toContain(orphan.thumb);
    expect(left).not.toContain(stray);
    for (const row of await rowsOfRig()) {
      expect(left).toContain(row.objectKey);
      expect(left).toContain(row.thumbKey);
    }
    expect(left).toContain(keptRow!.objectKey);
  });
});

describe("Who may do what with photos", () => {
  test("guests see photos but add none; strangers and the signed-out get 404 / 401", async () => {
    const added = await upload("owner", { partId: "fuse-panel" }, await png());
    const id = added.photo!.id;
    expect((await getPicture("guest", id)).status).toBe(200);
    expect((await getPicture("crew", id, "?size=thumb")).status).toBe(200);
    expect((await getPicture("stranger", id)).status).toBe(404);
    expect((await getPicture(null, id)).status).toBe(401);
    const list = await call(photosRoute.loader, new Request(new URL(`/api/rigs/${rigId}/photos?partId=fuse-panel`, TEST_ORIGIN), { headers: { cookie: cookies.guest } }), { rigId });
    expect(list.status).toBe(200);
    const body = (await list.json()) as { photos: Array<{ id: string; partId: string }> };
    expect(body.photos.map((p) => p.id)).toContain(id);
    expect(body.photos.every((p) => p.partId === "fuse-panel")).toBe(true);

    const guestAdds = await upload("guest", { readingId }, await png());
    expect(guestAdds.status).toBe(403);
    expect(guestAdds.error?.code).toBe("forbidden");
    expect((await deletePhoto("guest", id)).status).toBe(403);
    expect((await upload("stranger", { partId: "fuse-panel" }, await png())).status).toBe(404);
    expect((await upload(null, { partId: "fuse-panel" }, await png())).status).toBe(401);
  });

  test("crew add photos to readings, not to the model; they delete their own reading photos, not others' or the model's", async () => {
    expect((await upload("crew", { partId: "fuse-panel" }, await png())).status).toBe(403);
    expect((await upload("crew", { place: "Battery compartment" }, await png())).status).toBe(403);
    const own = await upload("crew", { readingId }, await png());
    expect(own.status).toBe(201);
    const ownerPart = await upload("owner", { partId: "fuse-panel" }, await png());
    expect((await deletePhoto("crew", ownerPart.photo!.id)).status).toBe(403);
    expect((await deletePhoto("crew2", own.photo!.id)).status).toBe(403);
    expect((await deletePhoto("crew", own.photo!.id)).status).toBe(200);
    const another = await upload("crew", { readingId }, await png());
    expect((await deletePhoto("owner", another.photo!.id)).status).toBe(200);
  });

  test("ids must belong to this rig: another rig's reading, an unknown part, another rig's photo", async () => {
    const foreignReading = await upload("owner", { readingId: otherReadingId }, await png());
    expect(foreignReading.status).toBe(404);
    expect(foreignReading.error?.code).toBe("unknown_reading");
    const unknownPart = await upload("owner", { partId: "sw-nowhere" }, await png());
    expect(unknownPart.status).toBe(400);
    expect(unknownPart.error?.code).toBe("unknown_part");
    const both = await upload("owner", { readingId, partId: "fuse-panel" }, await png());
    expect(both.status).toBe(400);
    const nothing = await upload("owner", {}, await png());
    expect(nothing.status).toBe(400);
    expect(nothing.error?.code).toBe("invalid_target");

    // A photo of the other rig, asked for through this rig's address, is not found.
    const theirs = await storePhoto(db, store, {
      rigId: otherRigId,
      authorId: ids.stranger,
      target: { kind: "part", partId: "fuse-panel", place: "" },
      caption: "",
      keepLocation: false,
      bytes: await png(),
    });
    expect((await getPicture("owner", theirs.id)).status).toBe(404);
    expect((await deletePhoto("owner", theirs.id)).status).toBe(404);
    expect((await db.select().from(photos).where(eq(photos.id, theirs.id))).length).toBe(1);
  });

  test("every refusal answers the JSON error shape", async () => {
    const answers = [
      await upload("guest", { readingId }, await png()),
      await upload("owner", { partId: "sw-nowhere" }, await png()),
      await upload("owner", { partId: "fuse-panel" }, new TextEncoder().encode("plain text")),
    ];
    for (const a of answers) {
      expect(a.error).toEqual({ code: expect.any(String), message: expect.any(String) });
    }
  });
});
