import { describe, expect, test } from "vitest";
import { ConfigError, parseEnv } from "~/env.server";
import { photoIdOfKey, photoKeys } from "~/storage/photo-store.server";
import { mayAddPhoto, mayDeletePhoto, mayKeepLocation } from "./permissions";

const production = {
  NODE_ENV: "production",
  APP_URL: "https://tilldawn.example",
  SESSION_SECRET: "s".repeat(40),
  TOTP_SECRET: "a".repeat(64),
  SMTP_URL: "smtps://u:p@smtp.example.net:465",
};

describe("Photo storage settings", () => {
  test("a local run with no settings uses the S3 fake on loopback, on PHOTOS_S3_PORT", () => {
    expect(parseEnv({}).photos).toMatchObject({ endpoint: "http://127.0.0.1:4569", bucket: "tilldawn-photos", forcePathStyle: true, fake: true });
    expect(parseEnv({ PHOTOS_S3_PORT: "4601" }).photos?.endpoint).toBe("http://127.0.0.1:4601");
    expect(() => parseEnv({ PHOTOS_S3_PORT: "nope" })).toThrow(/PHOTOS_S3_PORT/);
  });

  test("production without a bucket runs with photos off; with one, the bucket's settings are used", () => {
    expect(parseEnv(production).photos).toBeNull();
    const env = parseEnv({
      ...production,
      PHOTOS_S3_BUCKET: "juniper-photos",
      PHOTOS_S3_ENDPOINT: "https://s3.example.net",
      PHOTOS_S3_REGION: "eu-central-1",
      PHOTOS_S3_ACCESS_KEY_ID: "id",
      PHOTOS_S3_SECRET_ACCESS_KEY: "secret",
    });
    expect(env.photos).toEqual({
      bucket: "juniper-photos",
      endpoint: "https://s3.example.net",
      region: "eu-central-1",
      credentials: { accessKeyId: "id", secretAccessKey: "secret" },
      forcePathStyle: true,
      fake: false,
    });
    // AWS itself: no endpoint, virtual-hosted addressing, the SDK's own credential chain.
    expect(parseEnv({ ...production, PHOTOS_S3_BUCKET: "juniper-photos" }).photos).toMatchObject({ endpoint: undefined, forcePathStyle: false, credentials: undefined });
  });

  test("half a key pair, a store without a bucket, or a bad bucket name stops the server naming the variable", () => {
    expect(() => parseEnv({ ...production, PHOTOS_S3_BUCKET: "b-1", PHOTOS_S3_ACCESS_KEY_ID: "id" })).toThrow(/PHOTOS_S3_SECRET_ACCESS_KEY/);
    expect(() => parseEnv({ ...production, PHOTOS_S3_ENDPOINT: "https://s3.example.net" })).toThrow(/PHOTOS_S3_BUCKET: is required/);
    expect(() => parseEnv({ PHOTOS_S3_BUCKET: "Not A Bucket" })).toThrow(ConfigError);
  });
});

describe("Photo object keys", () => {
  test("a key names its photo, so the sweep can find its row", () => {
    const rig = crypto.randomUUID();
    const photo = crypto.randomUUID();
    const keys = photoKeys(rig, photo, "png");
    expect(keys).toEqual({ original: `photos/${rig}/${photo}/original.png`, thumb: `photos/${rig}/${photo}/thumb.webp` });
    expect(photoIdOfKey(keys.original)).toBe(photo);
    expect(photoIdOfKey(keys.thumb)).toBe(photo);
    expect(photoIdOfKey(`photos/${rig}/stray.txt`)).toBeNull();
  });
});

describe("Who may do what with photos", () => {
  test("owners add to parts; crew only to readings; guests nothing", () => {
    expect([mayAddPhoto("owner", "part"), mayAddPhoto("crew", "part"), mayAddPhoto("guest", "part")]).toEqual([true, false, false]);
    expect([mayAddPhoto("owner", "reading"), mayAddPhoto("crew", "reading"), mayAddPhoto("guest", "reading")]).toEqual([true, true, false]);
    expect(mayKeepLocation("owner")).toBe(true);
    expect(mayKeepLocation("crew")).toBe(false);
  });

  test("crew delete only reading photos they added; owners delete any", () => {
    const partPhoto = { readingId: null, authorId: "sam" };
    const readingPhoto = { readingId: "r1", authorId: "sam" };
    expect(mayDeletePhoto("crew", partPhoto, "sam")).toBe(false);
    expect(mayDeletePhoto("crew", readingPhoto, "sam")).toBe(true);
    expect(mayDeletePhoto("crew", readingPhoto, "kit")).toBe(false);
    expect(mayDeletePhoto("guest", readingPhoto, "sam")).toBe(false);
    expect(mayDeletePhoto("owner", partPhoto, "ada")).toBe(true);
  });
});
