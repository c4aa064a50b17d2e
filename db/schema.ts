import { sql } from 'drizzle-orm';
import {
  type AnyPgColumn,
  bigint,
  boolean,
  check,
  jsonb,
  date,
  index,
  integer,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  varchar,
} from 'drizzle-orm/pg-core';

export const roleEnum = pgEnum('member_role', ['owner', 'grower', 'viewer']);
export const unitsEnum = pgEnum('length_units', ['mm', 'in']);

export const users = pgTable(
  'users',
  {
    id: text('id').primaryKey(),
    email: text('email').notNull(),
    displayName: text('display_name').notNull(),
    passwordHash: text('password_hash').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_unique').on(t.email)],
);

/** Lucia's session table: one row per signed-in browser, shared by every server process. */
export const sessions = pgTable(
  'sessions',
  {
    id: text('id').primaryKey(),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

export const collections = pgTable(
  'collections',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    name: text('name').notNull(),
    /** Month (1–12) in which the grower's growth year starts; 3 suits the north, 9 the south. */
    seasonStartMonth: integer('season_start_month').notNull().default(3),
    units: unitsEnum('units').notNull().default('mm'),
    latitude: real('latitude'),
    longitude: real('longitude'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('collections_season_start_month', sql`${t.seasonStartMonth} between 1 and 12`),
    check('collections_latitude', sql`${t.latitude} is null or ${t.latitude} between -90 and 90`),
    check('collections_longitude', sql`${t.longitude} is null or ${t.longitude} between -180 and 180`),
  ],
);

export const memberships = pgTable(
  'memberships',
  {
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: roleEnum('role').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.collectionId, t.userId] }), index('memberships_user_idx').on(t.userId)],
);

// ── Plant records ──────────────────────────────────────────────────────────────────────

export const leadStatusEnum = pgEnum('lead_status', ['growing', 'mature', 'dried_off', 'rotted', 'removed']);
export const sheathStateEnum = pgEnum('sheath_state', ['none', 'forming', 'empty', 'budded', 'dry']);
export const careKindEnum = pgEnum('care_kind', ['water', 'feed', 'repot', 'treat', 'move', 'damage', 'note']);
export const damageKindEnum = pgEnum('damage_kind', ['sunburn', 'cold', 'rot', 'mechanical', 'pest', 'other']);

const timestamps = {
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
};

export const areas = pgTable(
  'areas',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    indoors: boolean('indoors').notNull().default(false),
    /** The grower's walking order for Rounds; lower comes first. */
    position: integer('position').notNull().default(0),
    notes: text('notes'),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [uniqueIndex('areas_collection_name_unique').on(t.collectionId, t.name)],
);

export const plants = pgTable(
  'plants',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    tag: text('tag').notNull(),
    /** Standard genus abbreviation as written on a tag: "C.", "Rlc.", "Den.". */
    genus: text('genus').notNull(),
    /** Grex (hybrid) or species epithet. */
    epithet: text('epithet').notNull(),
    isSpecies: boolean('is_species').notNull().default(false),
    clonalName: text('clonal_name'),
    source: text('source'),
    acquiredOn: date('acquired_on'),
    areaId: uuid('area_id').references(() => areas.id, { onDelete: 'set null' }),
    medium: text('medium'),
    notes: text('notes'),
    parentPlantId: uuid('parent_plant_id').references((): AnyPgColumn => plants.id, { onDelete: 'set null' }),
    dividedOn: date('divided_on'),
    /** Position in the collection's saved Rounds order; null sorts after, by area then tag. */
    roundPosition: integer('round_position'),
    /** The grower's own minimum night temperature for this plant, °C; null uses the genus default. */
    minNightTempC: real('min_night_temp_c'),
    /**
     * A read-only copy of another grower's plant, brought in with a division handed over to
     * this collection so the division's forecasts start from its real history. No writes.
     */
    historyOnly: boolean('history_only').notNull().default(false),
    /** Set on the giver's plant when it was handed to someone else (see division_handoffs). */
    givenAwayOn: date('given_away_on'),
    givenTo: text('given_to'),
    /** Set on the recipient's plant: who handed it over. */
    receivedFrom: text('received_from'),
    version: integer('version').notNull().default(1),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('plants_collection_tag_unique').on(t.collectionId, t.tag),
    index('plants_parent_idx').on(t.parentPlantId),
    index('plants_area_idx').on(t.areaId),
    check('plants_division_dated', sql`(${t.parentPlantId} is null) or (${t.dividedOn} is not null)`),
    check('plants_min_night_temp_range', sql`${t.minNightTempC} is null or ${t.minNightTempC} between -20 and 35`),
  ],
);

export const leads = pgTable(
  'leads',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    plantId: uuid('plant_id')
      .notNull()
      .references(() => plants.id, { onDelete: 'cascade' }),
    /** Growth year, as the collection counts seasons (see collections.season_start_month). */
    season: integer('season').notNull(),
    label: text('label').notNull(),
    firstSeen: date('first_seen').notNull(),
    parentLeadId: uuid('parent_lead_id').references((): AnyPgColumn => leads.id, { onDelete: 'set null' }),
    status: leadStatusEnum('status').notNull().default('growing'),
    /** Broke from a back bulb (expected smaller than last season's lead). */
    fromBackBulb: boolean('from_back_bulb').notNull().default(false),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('leads_plant_label_unique').on(t.plantId, t.label),
    index('leads_collection_idx').on(t.collectionId),
    check('leads_season_range', sql`${t.season} between 1900 and 2200`),
  ],
);

export const measurements = pgTable(
  'measurements',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    leadId: uuid('lead_id')
      .notNull()
      .references(() => leads.id, { onDelete: 'cascade' }),
    measuredOn: date('measured_on').notNull(),
    heightMm: real('height_mm').notNull(),
    leafCount: integer('leaf_count'),
    sheath: sheathStateEnum('sheath').notNull().default('none'),
    rootTips: integer('root_tips'),
    bulbWidthMm: real('bulb_width_mm'),
    note: text('note'),
    /** Sent by the client with each new entry so a retried upload is stored once. */
    clientKey: text('client_key'),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [
    index('measurements_lead_idx').on(t.leadId, t.measuredOn),
    uniqueIndex('measurements_client_key_unique').on(t.collectionId, t.clientKey),
    check('measurements_height_range', sql`${t.heightMm} >= 0 and ${t.heightMm} <= 1500`),
    check('measurements_leaf_range', sql`${t.leafCount} is null or ${t.leafCount} between 0 and 30`),
  ],
);

export const bloomRecords = pgTable(
  'bloom_records',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    leadId: uuid('lead_id')
      .notNull()
      .references(() => leads.id, { onDelete: 'cascade' }),
    budsSeenOn: date('buds_seen_on'),
    firstOpenOn: date('first_open_on'),
    lastFadedOn: date('last_faded_on'),
    flowerCount: integer('flower_count'),
    spikeCount: integer('spike_count'),
    note: text('note'),
    version: integer('version').notNull().default(1),
    ...timestamps,
  },
  (t) => [uniqueIndex('bloom_records_lead_unique').on(t.leadId)],
);

export const careEntries = pgTable(
  'care_entries',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    plantId: uuid('plant_id').references(() => plants.id, { onDelete: 'cascade' }),
    areaId: uuid('area_id').references(() => areas.id, { onDelete: 'cascade' }),
    kind: careKindEnum('kind').notNull(),
    occurredOn: date('occurred_on').notNull(),
    withCalcium: boolean('with_calcium'),
    newMedium: text('new_medium'),
    product: text('product'),
    target: text('target'),
    toAreaId: uuid('to_area_id').references(() => areas.id, { onDelete: 'set null' }),
    damageKind: damageKindEnum('damage_kind'),
    note: text('note'),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    index('care_entries_plant_idx').on(t.plantId, t.occurredOn),
    index('care_entries_area_idx').on(t.areaId, t.occurredOn),
    check('care_entries_one_subject', sql`(${t.plantId} is null) <> (${t.areaId} is null)`),
  ],
);

// ── Photos and mail ────────────────────────────────────────────────────────────────────

/**
 * A photograph of a plant, optionally of one lead or one measurement of it. The image
 * files live in the photo store (local disk or S3) under `storage_key`; only members of
 * the collection can fetch them, through the API.
 */
export const photos = pgTable(
  'photos',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    plantId: uuid('plant_id')
      .notNull()
      .references(() => plants.id, { onDelete: 'cascade' }),
    leadId: uuid('lead_id').references(() => leads.id, { onDelete: 'cascade' }),
    measurementId: uuid('measurement_id').references(() => measurements.id, { onDelete: 'set null' }),
    /** The day the photo shows: the measurement's date, else the picture's own date, else upload day. */
    takenOn: date('taken_on').notNull(),
    /** Prefix in the photo store; the display and thumbnail files hang off it. */
    storageKey: text('storage_key').notNull(),
    width: integer('width').notNull(),
    height: integer('height').notNull(),
    thumbWidth: integer('thumb_width').notNull(),
    thumbHeight: integer('thumb_height').notNull(),
    bytes: integer('bytes').notNull(),
    caption: text('caption'),
    uploadedBy: text('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('photos_storage_key_unique').on(t.storageKey),
    index('photos_plant_idx').on(t.plantId, t.takenOn),
    index('photos_lead_idx').on(t.leadId, t.takenOn),
    index('photos_collection_idx').on(t.collectionId),
  ],
);

/**
 * One row per photo upload that carried a client key: the key a browser chose before
 * sending. A resent upload with the same key gets the photo already stored, and a cancel
 * takes the same row, so upload and cancel are ordered by the row whichever comes first:
 * a cancel before the upload is stored refuses it, a cancel after removes the photo.
 */
export const photoUploads = pgTable(
  'photo_uploads',
  {
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    clientKey: uuid('client_key').notNull(),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    photoId: uuid('photo_id').references(() => photos.id, { onDelete: 'set null' }),
    cancelledAt: timestamp('cancelled_at', { withTimezone: true, mode: 'date' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ columns: [t.collectionId, t.clientKey] }),
    // Deleting a photo clears its key's photo_id: found by this index, not a scan.
    index('photo_uploads_photo_idx').on(t.photoId),
  ],
);

/**
 * Sign-in and mail budgets shared by every server process (server/middleware/rate-limit.ts).
 * rate-limiter-flexible reads and writes it with its own queries, so its shape is that
 * library's: the limiter's key, points used, and when the window ends (epoch ms).
 */
export const rateLimitCounts = pgTable('rate_limit_counts', {
  key: varchar('key', { length: 255 }).primaryKey(),
  points: integer('points').notNull().default(0),
  expire: bigint('expire', { mode: 'number' }),
});

/** An owner's invitation by e-mail; the link's token is stored only as its SHA-256 hash. */
export const invitations = pgTable(
  'invitations',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    role: roleEnum('role').notNull(),
    tokenHash: text('token_hash').notNull(),
    invitedBy: text('invited_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true, mode: 'date' }),
    acceptedBy: text('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    revokedAt: timestamp('revoked_at', { withTimezone: true, mode: 'date' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('invitations_token_unique').on(t.tokenHash),
    index('invitations_collection_idx').on(t.collectionId),
  ],
);

/** A password-reset request; single use, short-lived, stored only as its SHA-256 hash. */
export const passwordResets = pgTable(
  'password_resets',
  {
    tokenHash: text('token_hash').primaryKey(),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true, mode: 'date' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('password_resets_user_idx').on(t.userId)],
);

/**
 * A sign-up waiting for its address to be confirmed: the link mailed to it (SHA-256 of the token
 * kept) creates the account. Nothing else exists for the address until then, so a sign-up answers
 * the same whether the address is new or taken (OWASP ASVS V2.1.12).
 */
export const signUpRequests = pgTable(
  'sign_up_requests',
  {
    tokenHash: text('token_hash').primaryKey(),
    email: text('email').notNull(),
    displayName: text('display_name').notNull(),
    passwordHash: text('password_hash').notNull(),
    /** Where the app goes once the account exists (an invitation or hand-off page), or null for Today. */
    nextPath: text('next_path'),
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('sign_up_requests_expires_idx').on(t.expiresAt)],
);

/**
 * Per member and collection: whether the weekly digest is wanted, and the key its
 * unsubscribe link carries (it can only switch the digest off, so it is kept as is).
 */
export const digestSubscriptions = pgTable(
  'digest_subscriptions',
  {
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    optedOut: boolean('opted_out').notNull().default(false),
    unsubscribeKey: text('unsubscribe_key').notNull(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ columns: [t.collectionId, t.userId] }),
    uniqueIndex('digest_subscriptions_key_unique').on(t.unsubscribeKey),
  ],
);

/** One row per digest period; the process that inserts it sends that period's mail. */
export const digestRuns = pgTable('digest_runs', {
  /** The period's name, such as "2026-W49". */
  period: text('period').primaryKey(),
  claimedBy: text('claimed_by').notNull(),
  claimedAt: timestamp('claimed_at', { withTimezone: true }).notNull().defaultNow(),
  finishedAt: timestamp('finished_at', { withTimezone: true }),
  sent: integer('sent').notNull().default(0),
});

// ── Import, hand-off and cold nights ───────────────────────────────────────────────────

/**
 * The column mapping a collection last used for a spreadsheet with a given header row, so the
 * same file (or next year's from the same template) maps itself. `header_key` is the SHA-256 of
 * the normalised header names in order.
 */
export const importMappings = pgTable(
  'import_mappings',
  {
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    headerKey: text('header_key').notNull(),
    /** Our field name → the spreadsheet's column name, plus the grower's date order and unit. */
    mapping: jsonb('mapping').notNull(),
    updatedBy: text('updated_by').references(() => users.id, { onDelete: 'set null' }),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.collectionId, t.headerKey] })],
);

/**
 * A division sent to someone by e-mail. The link's token is stored only as its SHA-256 hash;
 * on acceptance the plant (with a read-only copy of its lineage history) is copied into a
 * collection of the recipient's, and the giver's plant notes where it went.
 */
export const divisionHandoffs = pgTable(
  'division_handoffs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    plantId: uuid('plant_id')
      .notNull()
      .references(() => plants.id, { onDelete: 'cascade' }),
    recipientEmail: text('recipient_email').notNull(),
    note: text('note'),
    tokenHash: text('token_hash').notNull(),
    sentBy: text('sent_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true, mode: 'date' }),
    acceptedBy: text('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    acceptedCollectionId: uuid('accepted_collection_id').references(() => collections.id, { onDelete: 'set null' }),
    acceptedPlantId: uuid('accepted_plant_id').references(() => plants.id, { onDelete: 'set null' }),
    revokedAt: timestamp('revoked_at', { withTimezone: true, mode: 'date' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('division_handoffs_token_unique').on(t.tokenHash),
    index('division_handoffs_collection_idx').on(t.collectionId),
    index('division_handoffs_plant_idx').on(t.plantId),
  ],
);

/**
 * One row per collection and cold night for which the same-day warning went out; the process
 * that inserts the row sends the mail, so several servers send it once.
 */
export const coldNightAlerts = pgTable(
  'cold_night_alerts',
  {
    collectionId: uuid('collection_id')
      .notNull()
      .references(() => collections.id, { onDelete: 'cascade' }),
    night: date('night').notNull(),
    claimedBy: text('claimed_by').notNull(),
    claimedAt: timestamp('claimed_at', { withTimezone: true }).notNull().defaultNow(),
    sent: integer('sent').notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.collectionId, t.night] })],
);
