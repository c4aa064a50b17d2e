import { sql } from 'drizzle-orm';
import {
  check,
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
