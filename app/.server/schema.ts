/**
 * The one Drizzle schema of Ergoshelf. Migrations are generated from it by drizzle-kit into
 * drizzle/ (`npm run db:generate`); reference data (roles) and the edition guard trigger live in
 * hand-written migrations beside the generated ones.
 */
import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  customType,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  smallint,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";

const bytea = customType<{ data: Buffer }>({ dataType: () => "bytea" });

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();

/** Reference data: the roles and their rank (seeded by a migration, not by the demo seed). */
export const roles = pgTable("roles", {
  name: text("name").primaryKey(),
  rank: smallint("rank").notNull().unique(),
  description: text("description").notNull(),
});

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    passwordHash: text("password_hash").notNull(),
    role: text("role")
      .notNull()
      .references(() => roles.name),
    disabled: boolean("disabled").notNull().default(false),
    isDemo: boolean("is_demo").notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_lower").on(sql`lower(${t.email})`)],
);

/** Server-side sessions: the cookie holds a random id; the row holds its SHA-256. */
export const sessions = pgTable(
  "sessions",
  {
    idHash: text("id_hash").primaryKey(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    lastSeenAt: timestamp("last_seen_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("sessions_user").on(t.userId)],
);

export const families = ["iid", "markov", "two-state", "graph-walk", "hidden"] as const;
export const familyEnum = pgEnum("family", families);

export const models = pgTable("models", {
  id: uuid("id").primaryKey().defaultRandom(),
  slug: text("slug").notNull().unique(),
  title: text("title").notNull(),
  family: familyEnum("family").notNull(),
  summary: text("summary").notNull(),
  tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
  provenance: text("provenance").notNull().default(""),
  methods: text("methods").array().notNull().default(sql`'{}'::text[]`),
  isSynthetic: boolean("is_synthetic").notNull().default(false),
  createdAt: createdAt(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * Editions are immutable once inserted: a trigger (migration 0001) refuses DELETE, and refuses
 * any UPDATE except setting the retraction fields once.
 */
export const editions = pgTable(
  "editions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    modelId: uuid("model_id")
      .notNull()
      .references(() => models.id),
    number: integer("number").notNull(),
    params: jsonb("params").notNull(),
    contentHash: text("content_hash").notNull(),
    figures: jsonb("figures").notNull(),
    verification: jsonb("verification").notNull(),
    engineVersion: text("engine_version").notNull(),
    note: text("note").notNull().default(""),
    publishedAt: timestamp("published_at", { withTimezone: true }).notNull().defaultNow(),
    publishedBy: uuid("published_by").references(() => users.id),
    retractedAt: timestamp("retracted_at", { withTimezone: true }),
    retractionReason: text("retraction_reason"),
    retractedBy: uuid("retracted_by").references(() => users.id),
  },
  (t) => [uniqueIndex("editions_model_number").on(t.modelId, t.number)],
);

export const workspaceItems = pgTable(
  "workspace_items",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: uuid("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    title: text("title").notNull(),
    notes: text("notes").notNull().default(""),
    family: familyEnum("family").notNull(),
    params: jsonb("params").notNull(),
    sourceEditionId: uuid("source_edition_id").references(() => editions.id),
    revision: integer("revision").notNull().default(1),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("workspace_items_owner").on(t.ownerId)],
);

export const workspaceRevisions = pgTable(
  "workspace_revisions",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    itemId: uuid("item_id")
      .notNull()
      .references(() => workspaceItems.id, { onDelete: "cascade" }),
    revision: integer("revision").notNull(),
    title: text("title").notNull(),
    notes: text("notes").notNull(),
    params: jsonb("params").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("workspace_revisions_item_revision").on(t.itemId, t.revision)],
);

export const proposalStates = ["submitted", "changes-requested", "resubmitted", "accepted", "declined", "withdrawn"] as const;
export const proposalStateEnum = pgEnum("proposal_state", proposalStates);
export const proposalKindEnum = pgEnum("proposal_kind", ["new-model", "new-edition"]);

export const proposals = pgTable(
  "proposals",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    itemId: uuid("item_id").references(() => workspaceItems.id, { onDelete: "set null" }),
    authorId: uuid("author_id")
      .notNull()
      .references(() => users.id),
    kind: proposalKindEnum("kind").notNull(),
    targetModelId: uuid("target_model_id").references(() => models.id),
    proposedSlug: text("proposed_slug"),
    title: text("title").notNull(),
    family: familyEnum("family").notNull(),
    state: proposalStateEnum("state").notNull().default("submitted"),
    snapshot: jsonb("snapshot").notNull(),
    changeNote: text("change_note").notNull(),
    publishedEditionId: uuid("published_edition_id").references(() => editions.id),
    decidedBy: uuid("decided_by").references(() => users.id),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("proposals_state").on(t.state),
    index("proposals_author").on(t.authorId),
    // One open proposal per workspace item, and one open claim per new slug, even under a race.
    uniqueIndex("proposals_one_open_per_item")
      .on(t.itemId)
      .where(sql`${t.state} in ('submitted', 'changes-requested', 'resubmitted')`),
    uniqueIndex("proposals_one_open_per_slug")
      .on(t.proposedSlug)
      .where(sql`${t.state} in ('submitted', 'changes-requested', 'resubmitted')`),
  ],
);

export const reviewComments = pgTable(
  "review_comments",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    proposalId: uuid("proposal_id")
      .notNull()
      .references(() => proposals.id, { onDelete: "cascade" }),
    authorId: uuid("author_id")
      .notNull()
      .references(() => users.id),
    kind: text("kind").notNull().default("comment"),
    body: text("body").notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("review_comments_proposal").on(t.proposalId)],
);

export const samples = pgTable(
  "samples",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: uuid("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    alphabet: jsonb("alphabet").notNull(),
    length: integer("length").notNull(),
    symbols: bytea("symbols").notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("samples_owner").on(t.ownerId)],
);

export const auditLog = pgTable(
  "audit_log",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    target: text("target"),
    details: jsonb("details").notNull().default(sql`'{}'::jsonb`),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("audit_log_at").on(t.at)],
);

export const apiTokens = pgTable("api_tokens", {
  id: uuid("id").primaryKey().defaultRandom(),
  userId: uuid("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  name: text("name").notNull(),
  tokenHash: text("token_hash").notNull().unique(),
  createdAt: createdAt(),
  lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
  revokedAt: timestamp("revoked_at", { withTimezone: true }),
});

export const invitations = pgTable("invitations", {
  id: uuid("id").primaryKey().defaultRandom(),
  email: text("email").notNull(),
  role: text("role")
    .notNull()
    .references(() => roles.name),
  tokenHash: text("token_hash").notNull().unique(),
  invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: createdAt(),
  expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
  acceptedAt: timestamp("accepted_at", { withTimezone: true }),
});
