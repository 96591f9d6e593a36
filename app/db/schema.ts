/**
 * The one database schema. The rig model itself is a JSON document (validated by the engine's
 * zod schema) kept in append-only revisions; everything that accumulates or is shared is
 * relational. Generate a migration after every change: `npm run db:generate`.
 */
import { sql } from "drizzle-orm";
import {
  bigserial,
  check,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
const id = () => uuid("id").primaryKey().defaultRandom();

export const rigRole = pgEnum("rig_role", ["owner", "crew", "guest"]);
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
