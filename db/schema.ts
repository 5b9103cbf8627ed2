import { sql } from "drizzle-orm";
import {
  blob,
  index,
  integer,
  primaryKey,
  real,
  sqliteTable,
  text,
  uniqueIndex,
} from "drizzle-orm/sqlite-core";

// Conventions: ids are text (random UUIDs unless stated); instants are integer
// milliseconds since the epoch (`timestamp_ms`); collection dates are ISO
// `YYYY-MM-DD` text, periods are [start, end); δ values in ‰ vs VSMOW;
// amounts in mm; coordinates WGS84 decimal degrees; elevation in metres.

const id = () =>
  text("id")
    .primaryKey()
    .$defaultFn(() => crypto.randomUUID());
const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .$defaultFn(() => new Date());

export const ROLES = ["contributor", "moderator", "admin"] as const;
export type Role = (typeof ROLES)[number];
export const PLANS = ["open", "researcher", "institution"] as const;
export type Plan = (typeof PLANS)[number];
export const SEVERITIES = ["note", "warn", "fail"] as const;
export type Severity = (typeof SEVERITIES)[number];

// ───────────────────────── people and organisations ─────────────────────────

export const users = sqliteTable(
  "users",
  {
    id: id(),
    name: text("name"),
    email: text("email").notNull(),
    emailVerified: integer("email_verified", { mode: "timestamp_ms" }),
    image: text("image"),
    passwordHash: text("password_hash"),
    role: text("role", { enum: ROLES }).notNull().default("contributor"),
    affiliation: text("affiliation"),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    disabledAt: integer("disabled_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_uq").on(t.email)],
);

// next-auth adapter tables (names and columns as @auth/drizzle-adapter expects).
export const accounts = sqliteTable(
  "accounts",
  {
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    type: text("type").notNull(),
    provider: text("provider").notNull(),
    providerAccountId: text("provider_account_id").notNull(),
    refresh_token: text("refresh_token"),
    access_token: text("access_token"),
    expires_at: integer("expires_at"),
    token_type: text("token_type"),
    scope: text("scope"),
    id_token: text("id_token"),
    session_state: text("session_state"),
  },
  (t) => [primaryKey({ columns: [t.provider, t.providerAccountId] })],
);

export const sessions = sqliteTable("sessions", {
  sessionToken: text("session_token").primaryKey(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  expires: integer("expires", { mode: "timestamp_ms" }).notNull(),
});

export const verificationTokens = sqliteTable(
  "verification_tokens",
  {
    identifier: text("identifier").notNull(),
    token: text("token").notNull(),
    expires: integer("expires", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.identifier, t.token] })],
);

/** One-time links of our own: e-mail verification, password reset. Only a hash is stored. */
export const authTokens = sqliteTable(
  "auth_tokens",
  {
    id: id(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    purpose: text("purpose", { enum: ["verify-email", "reset-password"] }).notNull(),
    tokenHash: text("token_hash").notNull(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    usedAt: integer("used_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("auth_tokens_hash_uq").on(t.tokenHash), index("auth_tokens_user_idx").on(t.userId)],
);

/** Failed sign-in throttling, keyed by e-mail and by client address. */
export const authThrottle = sqliteTable("auth_throttle", {
  key: text("key").primaryKey(),
  failures: integer("failures").notNull().default(0),
  windowStart: integer("window_start", { mode: "timestamp_ms" }).notNull(),
  lockedUntil: integer("locked_until", { mode: "timestamp_ms" }),
});

export const organizations = sqliteTable(
  "organizations",
  {
    id: id(),
    name: text("name").notNull(),
    slug: text("slug").notNull(),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("organizations_slug_uq").on(t.slug)],
);

export const memberships = sqliteTable(
  "memberships",
  {
    organizationId: text("organization_id")
      .notNull()
      .references(() => organizations.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: text("role", { enum: ["owner", "member"] }).notNull().default("member"),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.organizationId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

export const invitations = sqliteTable(
  "invitations",
  {
    id: id(),
    organizationId: text("organization_id")
      .notNull()
      .references(() => organizations.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    tokenHash: text("token_hash").notNull(),
    invitedBy: text("invited_by").references(() => users.id),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    acceptedAt: integer("accepted_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("invitations_token_uq").on(t.tokenHash), index("invitations_org_idx").on(t.organizationId)],
);

// ───────────────────────────── stations and intake ─────────────────────────────

export const STATION_STATUSES = ["pending", "approved", "returned", "rejected", "retired"] as const;
export const COLLECTOR_TYPES = [
  "bulk-oil",
  "bulk-paraffin",
  "bulk-tube-dip",
  "wet-only",
  "event",
  "snow",
  "other",
] as const;

export const stations = sqliteTable(
  "stations",
  {
    id: id(),
    code: text("code").notNull(),
    name: text("name").notNull(),
    lat: real("lat").notNull(),
    lon: real("lon").notNull(),
    elevationM: real("elevation_m").notNull(),
    collectorType: text("collector_type", { enum: COLLECTOR_TYPES }).notNull(),
    samplingInterval: text("sampling_interval", { enum: ["monthly", "weekly", "event", "daily", "other"] })
      .notNull()
      .default("monthly"),
    operatingOrg: text("operating_org"),
    country: text("country"),
    startDate: text("start_date"),
    notes: text("notes"),
    status: text("status", { enum: STATION_STATUSES }).notNull().default("pending"),
    /** Warnings raised at entry (JSON array of check results). */
    entryChecks: text("entry_checks", { mode: "json" }).$type<unknown[]>(),
    ownerId: text("owner_id").references(() => users.id),
    decidedBy: text("decided_by").references(() => users.id),
    decidedAt: integer("decided_at", { mode: "timestamp_ms" }),
    decisionReason: text("decision_reason"),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    /** Optimistic concurrency: bumped on every change; writers compare it. */
    rowVersion: integer("row_version").notNull().default(1),
    createdAt: createdAt(),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
  },
  (t) => [
    uniqueIndex("stations_code_uq").on(t.code),
    index("stations_owner_idx").on(t.ownerId),
    index("stations_status_idx").on(t.status),
  ],
);

export const uploads = sqliteTable(
  "uploads",
  {
    id: id(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id),
    fileName: text("file_name").notNull(),
    sizeBytes: integer("size_bytes").notNull(),
    sha256: text("sha256").notNull(),
    contentType: text("content_type"),
    content: blob("content", { mode: "buffer" }),
    createdAt: createdAt(),
  },
  (t) => [index("uploads_user_idx").on(t.userId)],
);

export const BATCH_STATUSES = ["queued", "in-review", "decided", "withdrawn"] as const;

export const batches = sqliteTable(
  "batches",
  {
    id: id(),
    contributorId: text("contributor_id")
      .notNull()
      .references(() => users.id),
    source: text("source", { enum: ["form", "csv", "resubmission", "seed"] }).notNull(),
    uploadId: text("upload_id").references(() => uploads.id),
    status: text("status", { enum: BATCH_STATUSES }).notNull().default("queued"),
    sampleCount: integer("sample_count").notNull().default(0),
    worstSeverity: text("worst_severity", { enum: SEVERITIES }),
    note: text("note"),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
    decidedAt: integer("decided_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("batches_contributor_idx").on(t.contributorId), index("batches_status_idx").on(t.status, t.createdAt)],
);

export const SAMPLE_STATUSES = ["pending", "accepted", "rejected", "returned", "superseded"] as const;
export type SampleStatus = (typeof SAMPLE_STATUSES)[number];

export const samples = sqliteTable(
  "samples",
  {
    id: id(),
    batchId: text("batch_id")
      .notNull()
      .references(() => batches.id),
    stationId: text("station_id")
      .notNull()
      .references(() => stations.id),
    /** 1 for a first submission; a resubmission after return gets previous + 1. */
    version: integer("version").notNull().default(1),
    previousId: text("previous_id"),
    status: text("status", { enum: SAMPLE_STATUSES }).notNull().default("pending"),
    startDate: text("start_date").notNull(),
    endDate: text("end_date").notNull(),
    amountMm: real("amount_mm"),
    d18O: real("d18o").notNull(),
    d2H: real("d2h").notNull(),
    d18OSd: real("d18o_sd"),
    d2HSd: real("d2h_sd"),
    method: text("method"),
    laboratory: text("laboratory"),
    scale: text("scale"),
    referenceWaters: text("reference_waters"),
    notes: text("notes"),
    dExcess: real("d_excess").notNull(),
    lcExcess: real("lc_excess"),
    /** Check results from lib/qc (JSON array). */
    checks: text("checks", { mode: "json" }).$type<unknown[]>().notNull().default(sql`'[]'`),
    worstSeverity: text("worst_severity", { enum: SEVERITIES }),
    decidedBy: text("decided_by").references(() => users.id),
    decidedAt: integer("decided_at", { mode: "timestamp_ms" }),
    decisionReason: text("decision_reason"),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    rowVersion: integer("row_version").notNull().default(1),
    createdAt: createdAt(),
  },
  (t) => [
    index("samples_batch_idx").on(t.batchId),
    index("samples_station_status_idx").on(t.stationId, t.status, t.startDate),
    index("samples_status_idx").on(t.status, t.decidedAt),
  ],
);

/** The audit trail: every decision and change that matters, never updated or deleted. */
export const reviewEvents = sqliteTable(
  "review_events",
  {
    id: id(),
    at: integer("at", { mode: "timestamp_ms" })
      .notNull()
      .$defaultFn(() => new Date()),
    actorId: text("actor_id").references(() => users.id),
    entityType: text("entity_type", {
      enum: ["sample", "station", "batch", "edition", "user", "organization", "api-key", "subscription"],
    }).notNull(),
    entityId: text("entity_id").notNull(),
    action: text("action").notNull(),
    before: text("before", { mode: "json" }),
    after: text("after", { mode: "json" }),
    reason: text("reason"),
  },
  (t) => [index("review_events_entity_idx").on(t.entityType, t.entityId, t.at), index("review_events_at_idx").on(t.at)],
);

// ───────────────────────────── editions and surfaces ─────────────────────────────

export const EDITION_STATUSES = ["building", "failed", "cancelled", "ready", "published", "withdrawn"] as const;

export const editions = sqliteTable(
  "editions",
  {
    /** Human id, e.g. 2026.12.1 */
    id: text("id").primaryKey(),
    status: text("status", { enum: EDITION_STATUSES }).notNull().default("building"),
    createdBy: text("created_by").references(() => users.id),
    jobId: text("job_id"),
    inputsHash: text("inputs_hash"),
    parameters: text("parameters", { mode: "json" }),
    /** Summary statistics: station counts, cross-validation per surface, timings. */
    summary: text("summary", { mode: "json" }),
    /** Differences from the previous published edition. */
    diff: text("diff", { mode: "json" }),
    isDemo: integer("is_demo", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
    publishedAt: integer("published_at", { mode: "timestamp_ms" }),
    /** Set when an admin withdraws a published edition (it stays citable, marked). */
    withdrawnAt: integer("withdrawn_at", { mode: "timestamp_ms" }),
    withdrawnReason: text("withdrawn_reason"),
  },
  (t) => [index("editions_status_idx").on(t.status, t.publishedAt)],
);

/** Long-term station means that went into an edition (period 0 = annual, 1–12 = months). */
export const editionStationMeans = sqliteTable(
  "edition_station_means",
  {
    editionId: text("edition_id")
      .notNull()
      .references(() => editions.id, { onDelete: "cascade" }),
    stationId: text("station_id")
      .notNull()
      .references(() => stations.id),
    period: integer("period").notNull(),
    d18O: real("d18o"),
    d2H: real("d2h"),
    dExcess: real("d_excess"),
    precipMm: real("precip_mm"),
    coverage: text("coverage", { mode: "json" }),
    included: integer("included", { mode: "boolean" }).notNull(),
    /** The station's position when the edition was built (frozen with the means). */
    lat: real("lat"),
    lon: real("lon"),
    elevationM: real("elevation_m"),
  },
  (t) => [primaryKey({ columns: [t.editionId, t.stationId, t.period] })],
);

export const SURFACE_VARIABLES = ["d18O", "dExcess", "d2H", "precipMm"] as const;
export type SurfaceVariable = (typeof SURFACE_VARIABLES)[number];

export const surfaces = sqliteTable(
  "surfaces",
  {
    id: id(),
    editionId: text("edition_id")
      .notNull()
      .references(() => editions.id, { onDelete: "cascade" }),
    variable: text("variable", { enum: SURFACE_VARIABLES }).notNull(),
    /** 0 = annual, 1–12 = calendar months */
    period: integer("period").notNull(),
    /** { lon0, lat0, dLon, dLat, nx, ny, chunk } — cell centres, degrees */
    grid: text("grid", { mode: "json" }).notNull(),
    /** Trend coefficients with standard errors. */
    trend: text("trend", { mode: "json" }),
    /** Empirical variogram and fitted model. */
    variogram: text("variogram", { mode: "json" }),
    /** Leave-one-out statistics and per-station residuals. */
    crossValidation: text("cross_validation", { mode: "json" }),
    /** min, max, mean of value and variance planes; station counts. */
    stats: text("stats", { mode: "json" }),
    /**
     * What the site predictor reloads: the fitted kriging model (lib/geostats krigingModelToJSON),
     * the station codes in model order and the transform; null for derived surfaces.
     */
    model: text("model", { mode: "json" }),
  },
  (t) => [uniqueIndex("surfaces_edition_var_period_uq").on(t.editionId, t.variable, t.period)],
);

/** Fixed-size Float32 chunks of a surface's planes (value, variance, extrapolation mask). */
export const surfaceChunks = sqliteTable(
  "surface_chunks",
  {
    surfaceId: text("surface_id")
      .notNull()
      .references(() => surfaces.id, { onDelete: "cascade" }),
    plane: text("plane", { enum: ["value", "variance", "extrapolation"] }).notNull(),
    chunkX: integer("chunk_x").notNull(),
    chunkY: integer("chunk_y").notNull(),
    data: blob("data", { mode: "buffer" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.surfaceId, t.plane, t.chunkX, t.chunkY] })],
);

export const elevationModels = sqliteTable("elevation_models", {
  id: id(),
  name: text("name").notNull(),
  uploadedBy: text("uploaded_by").references(() => users.id),
  grid: text("grid", { mode: "json" }).notNull(),
  data: blob("data", { mode: "buffer" }).notNull(),
  active: integer("active", { mode: "boolean" }).notNull().default(false),
  createdAt: createdAt(),
});

// ───────────────────────────────── background jobs ─────────────────────────────────

export const JOB_STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

export const jobs = sqliteTable(
  "jobs",
  {
    id: id(),
    kind: text("kind").notNull(),
    payload: text("payload", { mode: "json" }).notNull(),
    status: text("status", { enum: JOB_STATUSES }).notNull().default("queued"),
    progress: real("progress").notNull().default(0),
    stage: text("stage"),
    attempts: integer("attempts").notNull().default(0),
    maxAttempts: integer("max_attempts").notNull().default(3),
    leaseOwner: text("lease_owner"),
    leaseExpiresAt: integer("lease_expires_at", { mode: "timestamp_ms" }),
    runAfter: integer("run_after", { mode: "timestamp_ms" }).notNull(),
    cancelRequested: integer("cancel_requested", { mode: "boolean" }).notNull().default(false),
    /** Work saved so far, so a taken-over job resumes rather than restarts. */
    checkpoint: text("checkpoint", { mode: "json" }),
    result: text("result", { mode: "json" }),
    error: text("error"),
    createdBy: text("created_by"),
    createdAt: createdAt(),
    startedAt: integer("started_at", { mode: "timestamp_ms" }),
    finishedAt: integer("finished_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("jobs_claim_idx").on(t.status, t.runAfter), index("jobs_kind_idx").on(t.kind, t.createdAt)],
);

/** Every e-mail the app sends; the send-email job delivers queued rows. */
export const mailLog = sqliteTable(
  "mail_log",
  {
    id: id(),
    to: text("to").notNull(),
    subject: text("subject").notNull(),
    template: text("template").notNull(),
    html: text("html").notNull(),
    text: text("text").notNull(),
    status: text("status", { enum: ["queued", "sent", "failed"] }).notNull().default("queued"),
    providerId: text("provider_id"),
    error: text("error"),
    createdAt: createdAt(),
    sentAt: integer("sent_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("mail_log_status_idx").on(t.status, t.createdAt)],
);

// ───────────────────────────── billing and API access ─────────────────────────────

export const subscriptions = sqliteTable(
  "subscriptions",
  {
    id: id(),
    /** Exactly one of userId (Researcher) or organizationId (Institution) is set. */
    userId: text("user_id").references(() => users.id),
    organizationId: text("organization_id").references(() => organizations.id),
    plan: text("plan", { enum: ["researcher", "institution"] }).notNull(),
    interval: text("interval", { enum: ["month", "year"] }).notNull(),
    /** Stripe's own subscription status. */
    status: text("status").notNull(),
    stripeCustomerId: text("stripe_customer_id").notNull(),
    stripeSubscriptionId: text("stripe_subscription_id").notNull(),
    stripePriceId: text("stripe_price_id"),
    seats: integer("seats").notNull().default(1),
    currentPeriodEnd: integer("current_period_end", { mode: "timestamp_ms" }),
    cancelAtPeriodEnd: integer("cancel_at_period_end", { mode: "boolean" }).notNull().default(false),
    graceUntil: integer("grace_until", { mode: "timestamp_ms" }),
    /** `created` of the newest Stripe event applied, to ignore stale ones. */
    lastEventAt: integer("last_event_at"),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("subscriptions_stripe_uq").on(t.stripeSubscriptionId),
    index("subscriptions_user_idx").on(t.userId),
    index("subscriptions_org_idx").on(t.organizationId),
  ],
);

export const billingCustomers = sqliteTable(
  "billing_customers",
  {
    stripeCustomerId: text("stripe_customer_id").primaryKey(),
    userId: text("user_id").references(() => users.id),
    organizationId: text("organization_id").references(() => organizations.id),
    createdAt: createdAt(),
  },
  (t) => [index("billing_customers_user_idx").on(t.userId), index("billing_customers_org_idx").on(t.organizationId)],
);

export const webhookEvents = sqliteTable("webhook_events", {
  id: text("id").primaryKey(),
  type: text("type").notNull(),
  receivedAt: integer("received_at", { mode: "timestamp_ms" })
    .notNull()
    .$defaultFn(() => new Date()),
  processedAt: integer("processed_at", { mode: "timestamp_ms" }),
  error: text("error"),
});

export const apiKeys = sqliteTable(
  "api_keys",
  {
    id: id(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id),
    organizationId: text("organization_id").references(() => organizations.id),
    name: text("name").notNull(),
    /** First characters of the key, shown to the owner to tell keys apart. */
    prefix: text("prefix").notNull(),
    /** SHA-256 of the whole key; the key itself is shown once and never stored. */
    hash: text("hash").notNull(),
    scopes: text("scopes", { mode: "json" }).$type<string[]>().notNull(),
    lastUsedAt: integer("last_used_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("api_keys_hash_uq").on(t.hash), index("api_keys_user_idx").on(t.userId)],
);

/** Requests per day per key (or per anonymous client address, `anon:<addr>`). */
export const apiUsage = sqliteTable(
  "api_usage",
  {
    subject: text("subject").notNull(),
    day: text("day").notNull(),
    count: integer("count").notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.subject, t.day] })],
);
