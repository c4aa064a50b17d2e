import { getTableColumns, sql } from 'drizzle-orm';
import type { PgTable } from 'drizzle-orm/pg-core';
import type { Database } from '../client';
import { areas, bloomRecords, careEntries, leads, measurements, plants } from '../schema';
import type {
  GeneratedArea,
  GeneratedBloomRecord,
  GeneratedCareEntry,
  GeneratedCollection,
  GeneratedLead,
  GeneratedMeasurement,
  GeneratedPlant,
} from './generate';

/** The `tx` a `db.transaction(async (tx) => …)` callback receives. */
export type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0];

export interface InsertOptions {
  /** The account recorded as having made the measurements and care entries (the demo's grower). */
  createdBy: string | null;
  /** The account recorded as having added the plants (defaults to `createdBy`). */
  plantsCreatedBy?: string | null;
  /** Rows per INSERT statement (default 1,000). */
  chunkSize?: number;
}

export interface InsertReport {
  rows: Record<'areas' | 'plants' | 'leads' | 'measurements' | 'bloomRecords' | 'careEntries', number>;
  milliseconds: number;
}

// Compile-time guard: each generated row, with what the inserter adds, is a valid insert
// for its table (a renamed or retyped column breaks the type check, not the seed at run time).
type Adds = { collectionId: string };
const rowFits = <T>(_check: (row: T) => void) => undefined;
rowFits<GeneratedArea & Adds>((row) => ({ ...row }) satisfies typeof areas.$inferInsert);
rowFits<GeneratedPlant & Adds & { createdBy: string | null }>((row) => ({ ...row }) satisfies typeof plants.$inferInsert);
rowFits<GeneratedLead & Adds>((row) => ({ ...row }) satisfies typeof leads.$inferInsert);
rowFits<GeneratedMeasurement & Adds & { createdBy: string | null }>((row) => ({ ...row }) satisfies typeof measurements.$inferInsert);
rowFits<GeneratedBloomRecord & Adds>((row) => ({ ...row }) satisfies typeof bloomRecords.$inferInsert);
rowFits<GeneratedCareEntry & Adds & { createdBy: string | null }>((row) => ({ ...row }) satisfies typeof careEntries.$inferInsert);

/**
 * One multi-row INSERT whose rows travel as a single JSON parameter and are expanded by
 * `json_populate_recordset` on the server: no 65,535-parameter limit and little client work
 * per row (building a 1,000-row VALUES list through the query builder costs far more).
 * Columns not in the rows (version, timestamps) take their defaults.
 */
async function insertJsonChunk(tx: Transaction | Database, table: PgTable, rows: ReadonlyArray<Record<string, unknown>>): Promise<void> {
  if (rows.length === 0) return;
  const columns = getTableColumns(table) as Record<string, { name: string }>;
  const keys = Object.keys(rows[0]);
  const names = keys.map((key) => {
    const column = columns[key];
    if (!column) throw new Error(`no column ${key} in the table`);
    return column.name;
  });
  const json = JSON.stringify(
    rows.map((row) => {
      const out: Record<string, unknown> = {};
      for (let i = 0; i < keys.length; i++) out[names[i]] = row[keys[i]];
      return out;
    }),
  );
  const list = sql.join(
    names.map((name) => sql.identifier(name)),
    sql`, `,
  );
  await tx.execute(sql`insert into ${table} (${list}) select ${list} from json_populate_recordset(null::${table}, ${json}::json)`);
}

/**
 * Inserts a generated collection into `collectionId`, `chunkSize` rows per INSERT, inside the
 * caller's transaction (a failure leaves nothing once the caller rolls back). Tables go in
 * dependency order, and the generator already orders a parent plant before its divisions and
 * a lead after the lead it broke from.
 */
export async function insertGenerated(
  tx: Transaction | Database,
  collectionId: string,
  generated: GeneratedCollection,
  { createdBy, plantsCreatedBy = createdBy, chunkSize = 1000 }: InsertOptions,
): Promise<InsertReport> {
  const started = performance.now();
  const size = Math.max(1, Math.floor(chunkSize));

  async function insertAll<T extends object>(table: PgTable, rows: readonly T[], extra: Record<string, unknown>): Promise<number> {
    for (let i = 0; i < rows.length; i += size) {
      await insertJsonChunk(
        tx,
        table,
        rows.slice(i, i + size).map((row) => ({ ...row, ...extra })),
      );
    }
    return rows.length;
  }

  const rows = {
    areas: await insertAll(areas, generated.areas, { collectionId }),
    plants: await insertAll(plants, generated.plants, { collectionId, createdBy: plantsCreatedBy }),
    leads: await insertAll(leads, generated.leads, { collectionId }),
    measurements: await insertAll(measurements, generated.measurements, { collectionId, createdBy }),
    bloomRecords: await insertAll(bloomRecords, generated.bloomRecords, { collectionId }),
    careEntries: await insertAll(careEntries, generated.careEntries, { collectionId, createdBy }),
  };
  return { rows, milliseconds: Math.round(performance.now() - started) };
}
