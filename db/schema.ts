import { sql } from 'drizzle-orm';
import {
  type AnyPgColumn,
  boolean,
  check,
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
    version: integer('version').notNull().default(1),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('plants_collection_tag_unique').on(t.collectionId, t.tag),
    index('plants_parent_idx').on(t.parentPlantId),
    index('plants_area_idx').on(t.areaId),
    check('plants_division_dated', sql`(${t.parentPlantId} is null) or (${t.dividedOn} is not null)`),
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
