/**
 * The one database schema. The rig model itself is a JSON document (validated by the engine's
 * zod schema) kept in append-only revisions; everything that accumulates or is shared is
 * relational. Generate a migration after every change: `npm run db:generate`.
 */
import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  check,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
// Relative imports: drizzle-kit reads this file without the app's "~/" alias.
import { rigRoles } from "../auth/roles";
import { cableUnits, clocks, defaultPreferences, lengthUnits, temperatureUnits } from "../schemas/account";
import { socSources } from "../schemas/rig-state";
import { READING_SOURCES } from "../schemas/readings";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
const id = () => uuid("id").primaryKey().defaultRandom();

export const rigRole = pgEnum("rig_role", rigRoles);
export const branchKind = pgEnum("branch_kind", ["as_built", "draft"]);

export const users = pgTable(
  "users",
  {
    id: id(),
    email: text("email").notNull(),
    name: text("name").notNull().default(""),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("users_email_lower_key").on(sql`lower(${t.email})`),
    check("users_email_shape", sql`${t.email} ~ '^[^@\\s]+@[^@\\s]+$'`),
  ],
);

export const rigs = pgTable("rigs", {
  id: id(),
  name: text("name").notNull(),
  createdAt: createdAt(),
});

export const rigMembers = pgTable(
  "rig_members",
  {
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: rigRole("role").notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.rigId, t.userId] }), index("rig_members_user_idx").on(t.userId)],
);

/**
 * A line of model revisions: the rig's one "as built" head, or a draft to compare against it.
 * `headRevision` is the revision number a save must name; a stale number is refused (409).
 */
export const modelBranches = pgTable(
  "model_branches",
  {
    id: id(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    kind: branchKind("kind").notNull(),
    name: text("name").notNull(),
    headRevision: integer("head_revision").notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("model_branches_one_as_built").on(t.rigId).where(sql`${t.kind} = 'as_built'`),
    index("model_branches_rig_idx").on(t.rigId),
    check("model_branches_head_nonnegative", sql`${t.headRevision} >= 0`),
  ],
);

/** Append-only: a revision is never updated, a save inserts the next number. */
export const modelRevisions = pgTable(
  "model_revisions",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    branchId: uuid("branch_id")
      .notNull()
      .references(() => modelBranches.id, { onDelete: "cascade" }),
    revision: integer("revision").notNull(),
    schemaVersion: integer("schema_version").notNull(),
    document: jsonb("document").notNull(),
    message: text("message").notNull().default(""),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("model_revisions_branch_revision_key").on(t.branchId, t.revision),
    check("model_revisions_revision_positive", sql`${t.revision} >= 1`),
  ],
);

/* ------------------------------------------------------ accounts and sharing */

export const lengthUnit = pgEnum("length_unit", lengthUnits);
export const cableUnit = pgEnum("cable_unit", cableUnits);
export const temperatureUnit = pgEnum("temperature_unit", temperatureUnits);
export const clockFormat = pgEnum("clock_format", clocks);

/** One person's display preferences (a row per user, created on first save). */
export const userPreferences = pgTable("user_preferences", {
  userId: uuid("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  lengthUnit: lengthUnit("length_unit").notNull().default(defaultPreferences.lengthUnit),
  cableUnit: cableUnit("cable_unit").notNull().default(defaultPreferences.cableUnit),
  temperatureUnit: temperatureUnit("temperature_unit").notNull().default(defaultPreferences.temperatureUnit),
  nightDefault: boolean("night_default").notNull().default(defaultPreferences.nightDefault),
  /** Times on a 24-hour or a 12-hour clock. */
  clock: clockFormat("clock").notNull().default(defaultPreferences.clock),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * A signed-in browser. The session cookie carries the id (signed); deleting the row ends the
 * session at once. `expiresAt` rolls forward while the session is used.
 */
export const sessions = pgTable(
  "sessions",
  {
    id: id(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
    lastSeenAt: timestamp("last_seen_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    userAgent: text("user_agent").notNull().default(""),
  },
  (t) => [index("sessions_user_idx").on(t.userId), index("sessions_expires_idx").on(t.expiresAt)],
);

/** Fixed-window request counters that survive a restart (e.g. sign-in codes per address). */
export const rateLimitBuckets = pgTable("rate_limit_buckets", {
  key: text("key").primaryKey(),
  windowStartedAt: timestamp("window_started_at", { withTimezone: true }).notNull(),
  count: integer("count").notNull(),
});

/**
 * An owner's invitation to join a rig with a role. The link carries a random token; only its
 * SHA-256 is stored. It works once, until `expiresAt`, unless revoked.
 */
export const rigInvites = pgTable(
  "rig_invites",
  {
    id: id(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: rigRole("role").notNull(),
    tokenHash: text("token_hash").notNull(),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    acceptedBy: uuid("accepted_by").references(() => users.id, { onDelete: "set null" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("rig_invites_token_key").on(t.tokenHash), index("rig_invites_rig_idx").on(t.rigId)],
);

/* ------------------------------------------------------ shared rig state (Now) */

export const socSource = pgEnum("soc_source", socSources);

/**
 * The one shared picture of a rig right now: which loads are switched on, the chosen mode, the
 * latest SoC entry, the place and weather used for solar. One row per rig. `version` rises by
 * one with every accepted write (optimistic concurrency); `fieldTimes` holds, per field
 * ("load:<id>", "mode", "soc", "place"), the server time and author of its last change, so that
 * concurrent writes resolve last-writer-wins by server time (see DEVELOPERS.md).
 */
export const rigState = pgTable(
  "rig_state",
  {
    rigId: uuid("rig_id")
      .primaryKey()
      .references(() => rigs.id, { onDelete: "cascade" }),
    version: integer("version").notNull().default(0),
    modeId: text("mode_id"),
    /** loadId → on; loads absent follow the mode. */
    switches: jsonb("switches").$type<Record<string, boolean>>().notNull().default({}),
    /** switchId → position for physical switches set from the Now screen. */
    positions: jsonb("positions").$type<Record<string, string>>().notNull().default({}),
    socPct: doublePrecision("soc_pct"),
    socSource: socSource("soc_source"),
    socRestingV: doublePrecision("soc_resting_v"),
    socTakenAt: timestamp("soc_taken_at", { withTimezone: true }),
    /** SoC entries of the other banks: bankId → { socPct, source, restingV?, takenAt } (engine issue 10). */
    bankSocs: jsonb("bank_socs").$type<Record<string, { socPct: number; source: "entered" | "resting_voltage" | "logbook"; restingV?: number; takenAt: string }>>().notNull().default({}),
    /** { kind: "home" } | { kind: "device" | "typed", latDeg, lonDeg } */
    place: jsonb("place").$type<Record<string, unknown>>().notNull().default({ kind: "home" }),
    /** { kind: "clear" | "hazy" | "overcast" } | { kind: "percent", pct } */
    weather: jsonb("weather").$type<Record<string, unknown>>().notNull().default({ kind: "clear" }),
    fieldTimes: jsonb("field_times").$type<Record<string, { at: string; by: string | null }>>().notNull().default({}),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [check("rig_state_version_nonnegative", sql`${t.version} >= 0`)],
);

/** Append-only history of load switching (by hand or by applying a mode). */
export const switchChanges = pgTable(
  "switch_changes",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    loadId: text("load_id").notNull(),
    on: boolean("on").notNull(),
    /** Set when the change came from applying a mode. */
    modeId: text("mode_id"),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    clientTime: timestamp("client_time", { withTimezone: true }),
    serverTime: timestamp("server_time", { withTimezone: true }).notNull().defaultNow(),
    /** False when a later write (by server time) had already changed this load: kept for the record. */
    applied: boolean("applied").notNull().default(true),
  },
  (t) => [index("switch_changes_rig_time_idx").on(t.rigId, t.serverTime)],
);

/* ------------------------------------------------------------ logbook and sync */

export const readingSource = pgEnum("reading_source", READING_SOURCES);

/**
 * One logbook reading. The id is generated on the phone (idempotency: the same reading sent
 * twice is stored once). Readings are append-only facts: an edit is an explicit edit op by the
 * author or an owner, a delete sets `deletedAt` so sync can carry it. Current is signed:
 * + charging, − discharging.
 */
export const readings = pgTable(
  "readings",
  {
    id: uuid("id").primaryKey(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    takenAt: timestamp("taken_at", { withTimezone: true }).notNull(),
    bankVoltageV: real("bank_voltage_v"),
    currentA: real("current_a"),
    socPct: real("soc_pct"),
    temperatureC: real("temperature_c"),
    solarWhToday: real("solar_wh_today"),
    note: text("note").notNull().default(""),
    source: readingSource("source").notNull().default("hand"),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    deletedAt: timestamp("deleted_at", { withTimezone: true }),
  },
  (t) => [index("readings_rig_taken_idx").on(t.rigId, t.takenAt)],
);

/**
 * The change log: every change accepted by POST /api/sync (and every reading written by the
 * server) gets the next cursor. Phones pull "changes of this rig since my cursor". Writes for
 * one rig are serialised by an advisory lock, so within a rig a cursor never becomes visible
 * after a larger one. `changeId` is the phone's id of the change: sent twice, applied once.
 * Reading changes carry no payload (the pull reads the reading's current row).
 */
export const syncChanges = pgTable(
  "sync_changes",
  {
    cursor: bigserial("cursor", { mode: "number" }).primaryKey(),
    changeId: uuid("change_id").notNull(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    kind: text("kind").notNull(),
    entityId: text("entity_id").notNull(),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    clientTime: timestamp("client_time", { withTimezone: true }),
    serverTime: timestamp("server_time", { withTimezone: true }).notNull().defaultNow(),
    payload: jsonb("payload"),
  },
  (t) => [uniqueIndex("sync_changes_change_key").on(t.changeId), index("sync_changes_rig_cursor_idx").on(t.rigId, t.cursor)],
);

/* ------------------------------------------------------ alerts, push and devices (issue 13) */

/** One browser's push subscription for one person (the endpoint is the push service's URL for it). */
export const pushSubscriptions = pgTable(
  "push_subscriptions",
  {
    id: id(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    endpoint: text("endpoint").notNull(),
    p256dh: text("p256dh").notNull(),
    auth: text("auth").notNull(),
    /** A short name of the device, from its user agent, so a person can tell their phones apart. */
    label: text("label").notNull().default(""),
    createdAt: createdAt(),
    lastSentAt: timestamp("last_sent_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("push_subscriptions_endpoint_key").on(t.endpoint), index("push_subscriptions_user_idx").on(t.userId)],
);

/** A rig's alert rules as its owners set them (one document per rig; absent: the defaults). */
export const alertRules = pgTable("alert_rules", {
  rigId: uuid("rig_id")
    .primaryKey()
    .references(() => rigs.id, { onDelete: "cascade" }),
  rules: jsonb("rules").$type<Record<string, unknown>>().notNull(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
});

/**
 * One person's "Warn me" for one rig: which rules, quiet hours (local minutes from midnight in
 * `timeZone`; never applied to the cutoff warning), and the channels. `unsubscribeToken` makes
 * the one-click e-mail unsubscribe link.
 */
export const alertPreferences = pgTable(
  "alert_preferences",
  {
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    rules: jsonb("rules").$type<string[]>().notNull(),
    quietStartMin: integer("quiet_start_min"),
    quietEndMin: integer("quiet_end_min"),
    timeZone: text("time_zone").notNull().default("UTC"),
    push: boolean("push").notNull().default(true),
    email: boolean("email").notNull().default(false),
    unsubscribeToken: text("unsubscribe_token").notNull(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.rigId, t.userId] }), uniqueIndex("alert_preferences_unsubscribe_key").on(t.unsubscribeToken)],
);

/**
 * One episode of one rule on one rig: opened when the condition starts, cleared when it ends.
 * The partial unique index allows one open episode per rig and rule, so several servers
 * evaluating at once open it once (and so alert once).
 */
export const alertEpisodes = pgTable(
  "alert_episodes",
  {
    id: id(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    rule: text("rule").notNull(),
    startedAt: timestamp("started_at", { withTimezone: true }).notNull().defaultNow(),
    clearedAt: timestamp("cleared_at", { withTimezone: true }),
    title: text("title").notNull(),
    body: text("body").notNull(),
    clearBody: text("clear_body"),
    detail: jsonb("detail").$type<Record<string, unknown>>().notNull().default({}),
  },
  (t) => [
    uniqueIndex("alert_episodes_one_open").on(t.rigId, t.rule).where(sql`${t.clearedAt} is null`),
    index("alert_episodes_rig_idx").on(t.rigId, t.startedAt),
  ],
);

/** The alert log: one row per message to one person on one channel (and target device). */
export const alertDeliveries = pgTable(
  "alert_deliveries",
  {
    id: id(),
    episodeId: uuid("episode_id")
      .notNull()
      .references(() => alertEpisodes.id, { onDelete: "cascade" }),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    /** "alert" when the episode opened, "clear" for its all clear. */
    phase: text("phase").notNull(),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    channel: text("channel").notNull(),
    /** The push subscription id or the e-mail address. */
    target: text("target").notNull(),
    status: text("status").notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    error: text("error"),
    createdAt: createdAt(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("alert_deliveries_once").on(t.episodeId, t.phase, t.channel, t.target),
    index("alert_deliveries_rig_idx").on(t.rigId, t.createdAt),
  ],
);

/** A token a small computer aboard uses to post readings for one rig. Only its SHA-256 is kept. */
export const deviceTokens = pgTable(
  "device_tokens",
  {
    id: id(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    tokenHash: text("token_hash").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("device_tokens_hash_key").on(t.tokenHash), index("device_tokens_rig_idx").on(t.rigId)],
);

/** Which device posted a logbook reading (the reading itself is an ordinary `readings` row). */
export const deviceReadings = pgTable(
  "device_readings",
  {
    readingId: uuid("reading_id")
      .primaryKey()
      .references(() => readings.id, { onDelete: "cascade" }),
    deviceId: uuid("device_id")
      .notNull()
      .references(() => deviceTokens.id, { onDelete: "cascade" }),
  },
  (t) => [index("device_readings_device_idx").on(t.deviceId)],
);
/* ------------------------------------------------------------------ photos */

/**
 * A photo of a part of the rig (`partId`: an id in the rig's model, e.g. a bank, switch,
 * protection, circuit or load; `place`: a free label such as "battery compartment") or of a
 * logbook reading. The picture itself lives in the photo store (S3) under `objectKey` and
 * `thumbKey`. A row exists only once both objects are stored; objects with no row are orphans
 * that the cleanup job removes (app/photos/cleanup.server.ts).
 */
export const photos = pgTable(
  "photos",
  {
    id: uuid("id").primaryKey(),
    rigId: uuid("rig_id")
      .notNull()
      .references(() => rigs.id, { onDelete: "cascade" }),
    partId: text("part_id"),
    /** The kind of part when it was attached ("bank", "switch", …), for grouping. */
    partKind: text("part_kind"),
    place: text("place").notNull().default(""),
    readingId: uuid("reading_id").references(() => readings.id, { onDelete: "cascade" }),
    caption: text("caption").notNull().default(""),
    mime: text("mime").notNull(),
    bytes: integer("bytes").notNull(),
    width: integer("width").notNull(),
    height: integer("height").notNull(),
    objectKey: text("object_key").notNull(),
    thumbKey: text("thumb_key").notNull(),
    /** True when the owner chose to keep the picture's EXIF (with its location). */
    keptLocation: boolean("kept_location").notNull().default(false),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [
    index("photos_rig_created_idx").on(t.rigId, t.createdAt),
    index("photos_reading_idx").on(t.readingId),
    check("photos_on_something", sql`${t.readingId} IS NOT NULL OR ${t.partId} IS NOT NULL OR ${t.place} <> ''`),
    check("photos_reading_or_part", sql`${t.readingId} IS NULL OR (${t.partId} IS NULL AND ${t.place} = '')`),
  ],
);

/**
 * Every sign-in code we e-mailed: the address it was sent to, an HMAC of the code (keyed with
 * TOTP_SECRET and the row's id), when it stops working, how many tries it has had and when it
 * was used. The browser holds only the row's random id (cookie `tilldawn_sign_in`); at verify
 * this row, not the browser's cookies, decides who signs in (app/auth/sign-in.server.ts).
 */
export const issuedSignInCodes = pgTable(
  "issued_sign_in_codes",
  {
    id: id(),
    email: text("email").notNull(),
    codeHash: text("code_hash").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    tries: integer("tries").notNull().default(0),
    usedAt: timestamp("used_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index("issued_sign_in_codes_created_idx").on(t.createdAt)],
);
