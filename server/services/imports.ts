import { createHash, randomUUID } from 'node:crypto';
import type { Readable } from 'node:stream';
import { and, eq, getTableColumns, sql } from 'drizzle-orm';
import type { PgTable } from 'drizzle-orm/pg-core';
import Papa from 'papaparse';
import { type ColumnMapping, guessMapping, headerSignature, IMPORT_FIELDS, type LengthUnit, normaliseHeader, splitHeaderUnit } from '@/shared/import/fields';
import { type ExistingRecords, type ImportOptions, type ImportPlan, ImportReader, mappingProblems, planImport, planIsReady } from '@/shared/import/plan';
import type { FileEncoding } from '@/shared/import/encoding';
import type { DateOrder } from '@/shared/import/values';
import { IMPORT_MAX_BYTES, IMPORT_MAX_ISSUES, type ImportCheck, type ImportOptionsInput, type MappingAnswer } from '@/shared/schemas/imports';
import type { Database } from '../../db/client';
import { bloomRecords, collections, importMappings, leads, measurements, plants } from '../../db/schema';
import { HttpError, isDecompressionError, undecodableBody } from '../errors';
import { SpreadsheetDecoder } from './import-encoding';
import { type Executor, latestAllowedDate } from './records-support';

type Member = { collectionId: string; userId: string };

/** Rows per INSERT: one JSON parameter each, so no bind-parameter limit applies. */
const CHUNK_ROWS = 1000;

const tooLarge = () => {
  const reason = `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB; split it into parts`;
  return new HttpError(413, 'file_too_large', reason, [{ field: 'file', reason }]);
};

/** The SHA-256 of the normalised header names in order: the key a mapping is remembered by. */
export function headerKey(headers: ReadonlyArray<string>): string {
  return createHash('sha256').update(headerSignature(headers)).digest('hex');
}

/** A remembered mapping's columns, renamed to this file's spelling of the same headers. */
function respell(stored: ColumnMapping, headers: ReadonlyArray<string>): ColumnMapping {
  const byNormal = new Map(headers.map((h) => [normaliseHeader(h), h]));
  const out: ColumnMapping = {};
  for (const field of IMPORT_FIELDS) {
    const column = stored[field];
    const here = column === undefined ? undefined : byNormal.get(normaliseHeader(column));
    if (here !== undefined) out[field] = here;
  }
  return out;
}

interface StoredMapping {
  columns: ColumnMapping;
  dateOrder: DateOrder | null;
  heightUnit: LengthUnit | null;
}

/** The mapping this collection used last for the same header row, or a guess from the names. */
export async function mappingFor(db: Database, collectionId: string, headers: string[]): Promise<MappingAnswer> {
  const [row] = await db
    .select({ mapping: importMappings.mapping })
    .from(importMappings)
    .where(and(eq(importMappings.collectionId, collectionId), eq(importMappings.headerKey, headerKey(headers))))
    .limit(1);
  if (row) {
    const stored = row.mapping as StoredMapping;
    return { mapping: respell(stored.columns ?? {}, headers), source: 'remembered', dateOrder: stored.dateOrder ?? null, heightUnit: stored.heightUnit ?? null };
  }
  return { mapping: guessMapping(headers), source: 'guessed', dateOrder: null, heightUnit: null };
}

/**
 * Streams a CSV upload through papaparse into an ImportReader, which keeps only the mapped
 * cells of each row. The upload is counted as it arrives and refused (413) past the limit.
 */
export async function readUpload(
  stream: Readable,
  options: ImportOptionsInput,
  declaredBytes?: number,
  contentEncoding = 'identity',
): Promise<{ reader: ImportReader; options: ImportOptions; encoding: FileEncoding }> {
  if (declaredBytes !== undefined && declaredBytes > IMPORT_MAX_BYTES) throw tooLarge();
  let reader: ImportReader | undefined;
  let resolvedOptions: ImportOptions | undefined;
  let failure: Error | undefined;
  let bytes = 0;
  const decoder = new SpreadsheetDecoder();

  await new Promise<void>((resolve, reject) => {
    const parser = Papa.parse(Papa.NODE_STREAM_INPUT, { header: false, skipEmptyLines: false }) as unknown as NodeJS.ReadWriteStream;
    const fail = (error: Error) => {
      if (failure) return;
      failure = error;
      stream.unpipe(decoder);
      stream.resume();
      reject(error);
    };
    stream.on('data', (chunk: Buffer) => {
      bytes += chunk.length;
      if (bytes > IMPORT_MAX_BYTES) fail(tooLarge());
    });
    stream.on('error', (error) =>
      fail(
        isDecompressionError(error)
          ? undecodableBody(contentEncoding)
          : new HttpError(400, 'upload_interrupted', 'The upload stopped before the end; try again', [{ field: 'file', reason: error.message }]),
      ),
    );
    parser.on('data', (cells: string[]) => {
      if (failure) return;
      if (!reader) {
        const headers = cells.map((c) => c.trim());
        const nul = headers.findIndex((h) => h.includes('\u0000'));
        if (nul >= 0) {
          return fail(new HttpError(400, 'invalid_input', 'Some fields need attention', [{ field: `headers.${nul}`, reason: 'A column name in row 1 contains a NUL character; remove it' }]));
        }
        const mapping = options.mapping ?? guessMapping(headers);
        const problems = mappingProblems(headers, mapping);
        if (problems.length > 0) {
          return fail(new HttpError(400, 'invalid_mapping', 'The column mapping needs attention', problems.map((p) => ({ field: `mapping.${p.field}`, reason: p.reason }))));
        }
        reader = new ImportReader(headers, mapping);
        resolvedOptions = { mapping, dateOrder: options.dateOrder ?? null, heightUnit: (options.heightUnit as LengthUnit | null | undefined) ?? null };
        return;
      }
      reader.add(cells);
    });
    decoder.on('error', (error: Error) => fail(error));
    parser.on('error', (error: Error) => fail(error));
    parser.on('finish', () => {
      if (!failure) resolve();
    });
    parser.on('end', () => {
      if (!failure) resolve();
    });
    stream.pipe(decoder).pipe(parser as unknown as NodeJS.WritableStream);
  });

  if (!reader || !resolvedOptions) throw new HttpError(400, 'empty_file', 'The file is empty: it needs a header row and at least one row of records', [{ field: 'file', reason: 'no header row' }]);
  if (reader.rowCount === 0) throw new HttpError(400, 'empty_file', 'The file has a header row but no records', [{ field: 'file', reason: 'no rows after the header' }]);
  return { reader, options: resolvedOptions, encoding: decoder.encoding };
}

/** What the collection holds for the plants the file names: one query per table. */
async function loadExisting(db: Executor, collectionId: string, tags: string[]): Promise<ExistingRecords> {
  const tagList = JSON.stringify(tags);
  const inFile = sql`${plants.collectionId} = ${collectionId} and ${plants.tag} in (select jsonb_array_elements_text(${tagList}::jsonb))`;
  const plantRows = await db
    .select({ id: plants.id, tag: plants.tag, genus: plants.genus, epithet: plants.epithet, clonalName: plants.clonalName, historyOnly: plants.historyOnly })
    .from(plants)
    .where(inFile);
  if (plantRows.length === 0) return { plants: [], leads: [], measurements: [], blooms: [] };
  const leadRows = await db
    .select({ id: leads.id, plantId: leads.plantId, label: leads.label, season: leads.season, firstSeen: leads.firstSeen })
    .from(leads)
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(inFile);
  const measurementRows = await db
    .select({
      id: measurements.id,
      leadId: measurements.leadId,
      measuredOn: measurements.measuredOn,
      heightMm: measurements.heightMm,
      leafCount: measurements.leafCount,
      sheath: measurements.sheath,
      rootTips: measurements.rootTips,
    })
    .from(measurements)
    .innerJoin(leads, eq(leads.id, measurements.leadId))
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(inFile);
  const bloomRows = await db
    .select({
      leadId: bloomRecords.leadId,
      budsSeenOn: bloomRecords.budsSeenOn,
      firstOpenOn: bloomRecords.firstOpenOn,
      lastFadedOn: bloomRecords.lastFadedOn,
      flowerCount: bloomRecords.flowerCount,
      spikeCount: bloomRecords.spikeCount,
    })
    .from(bloomRecords)
    .innerJoin(leads, eq(leads.id, bloomRecords.leadId))
    .innerJoin(plants, eq(plants.id, leads.plantId))
    .where(inFile);
  return { plants: plantRows, leads: leadRows, measurements: measurementRows, blooms: bloomRows };
}

async function seasonStartMonth(db: Executor, collectionId: string): Promise<number> {
  const [row] = await db.select({ month: collections.seasonStartMonth }).from(collections).where(eq(collections.id, collectionId)).limit(1);
  return row?.month ?? 3;
}

function distinctTags(reader: ImportReader): string[] {
  const at = reader.fields.indexOf('tag');
  const tags = new Set<string>();
  for (const { cells } of reader.rows) if (cells[at]) tags.add(cells[at]);
  return [...tags];
}

async function plan(db: Executor, collectionId: string, reader: ImportReader, options: ImportOptions): Promise<{ result: ImportPlan; existing: ExistingRecords }> {
  const existing = await loadExisting(db, collectionId, distinctTags(reader));
  const result = planImport(reader, options, existing, { seasonStartMonth: await seasonStartMonth(db, collectionId), latestDate: latestAllowedDate(), today: new Date().toISOString().slice(0, 10) });
  return { result, existing };
}

function checkAnswer(reader: ImportReader, options: ImportOptions, result: ImportPlan, encoding: FileEncoding): ImportCheck {
  return {
    encoding,
    headers: [...reader.headers],
    mapping: options.mapping,
    dateOrder: { ...result.dateOrder, needed: result.needs.dateOrder },
    heightUnit: { fromHeader: options.mapping.height_mm ? splitHeaderUnit(options.mapping.height_mm).unit : null, used: result.heightUnit, needed: result.needs.heightUnit },
    counts: result.counts,
    preview: result.preview,
    issues: result.issues.slice(0, IMPORT_MAX_ISSUES),
    issueCount: result.issues.length,
    ready: planIsReady(result),
  };
}

/** The dry run: reads the whole file against the collection and writes nothing. */
export async function checkImport(db: Database, collectionId: string, reader: ImportReader, options: ImportOptions, encoding: FileEncoding): Promise<ImportCheck> {
  return checkAnswer(reader, options, (await plan(db, collectionId, reader, options)).result, encoding);
}

/** A file that cannot be imported as it stands: 400 with the report's first issues as fields. */
export class ImportRefused extends HttpError {
  constructor(readonly check: ImportCheck) {
    const needs = [
      ...(check.dateOrder.needed ? [{ field: 'dateOrder', reason: 'Choose whether the dates are day/month/year or month/day/year' }] : []),
      ...(check.heightUnit.needed ? [{ field: 'heightUnit', reason: 'Choose the unit of heights written without one' }] : []),
    ];
    const rows = check.issues.map((i) => ({ field: `rows.${i.row}.${i.column}`, reason: i.reason }));
    super(400, 'import_not_ready', `The file needs attention before it can be imported (${check.issueCount} issue${check.issueCount === 1 ? '' : 's'})`, [...needs, ...rows]);
  }
}

/** One multi-row INSERT whose rows travel as one JSON parameter (as db/seed/insert.ts does). */
async function insertJson(tx: Executor, table: PgTable, rows: ReadonlyArray<Record<string, unknown>>): Promise<void> {
  if (rows.length === 0) return;
  const columns = getTableColumns(table) as Record<string, { name: string }>;
  const keys = Object.keys(rows[0]);
  const names = keys.map((key) => columns[key].name);
  const json = JSON.stringify(rows.map((row) => Object.fromEntries(keys.map((key, i) => [names[i], row[key]]))));
  const list = sql.join(
    names.map((name) => sql.identifier(name)),
    sql`, `,
  );
  await tx.execute(sql`insert into ${table} (${list}) select ${list} from json_populate_recordset(null::${table}, ${json}::json)`);
}

export interface RunHooks {
  /** The encoding the file was read in, for the report of a refused file. */
  encoding?: FileEncoding;
  /** Called once the plan is known to be writable, before the first write. */
  onStart?: (total: number) => void;
  onProgress?: (done: number, total: number) => void;
}

/**
 * Writes a checked file in ONE transaction: every plant, lead, measurement and bloom record, or
 * nothing. Imports into one collection queue behind an advisory lock and plan against what is
 * stored once the lock is held, so a file sent twice at once is still written once. The mapping
 * is remembered for the header row. Throws ImportRefused (nothing written) when the file has issues.
 */
export async function runImport(db: Database, member: Member, reader: ImportReader, options: ImportOptions, hooks: RunHooks = {}): Promise<ImportPlan['counts']> {
  const { collectionId, userId } = member;
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`sympodia-import:${collectionId}`}))`);
    const { result, existing } = await plan(tx, collectionId, reader, options);
    if (!planIsReady(result)) throw new ImportRefused(checkAnswer(reader, options, result, hooks.encoding ?? 'utf-8'));

    const total =
      result.plants.length + result.leads.length + result.measurements.length + result.measurementFills.length + result.blooms.length + result.bloomFills.length;
    hooks.onStart?.(total);
    let done = 0;
    const write = async (table: PgTable, rows: ReadonlyArray<Record<string, unknown>>) => {
      for (let i = 0; i < rows.length; i += CHUNK_ROWS) {
        const chunk = rows.slice(i, i + CHUNK_ROWS);
        await insertJson(tx, table, chunk);
        done += chunk.length;
        hooks.onProgress?.(done, total);
      }
    };

    const plantIds = new Map(existing.plants.map((p) => [p.tag, p.id]));
    const newPlants = result.plants.map((p) => {
      const id = randomUUID();
      plantIds.set(p.tag, id);
      return { id, collectionId, tag: p.tag, genus: p.genus, epithet: p.epithet, clonalName: p.clonalName, createdBy: userId };
    });
    await write(plants, newPlants);

    const leadIds = new Map<string, string>();
    const newLeads = result.leads.map((l) => {
      const id = randomUUID();
      leadIds.set(`new:${l.tag}\u0000${l.label}`, id);
      return { id, collectionId, plantId: plantIds.get(l.tag)!, season: l.season, label: l.label, firstSeen: l.firstSeen, status: l.status };
    });
    await write(leads, newLeads);
    const leadId = (key: string) => (key.startsWith('new:') ? leadIds.get(key)! : key);

    await write(
      measurements,
      result.measurements.map((m) => ({
        collectionId,
        leadId: leadId(m.leadKey),
        measuredOn: m.measuredOn,
        heightMm: m.heightMm,
        leafCount: m.leafCount,
        sheath: m.sheath,
        rootTips: m.rootTips,
        createdBy: userId,
      })),
    );
    await write(
      bloomRecords,
      result.blooms.map(({ leadKey, ...b }) => ({ collectionId, leadId: leadId(leadKey), ...b })),
    );
    for (let i = 0; i < result.measurementFills.length; i += CHUNK_ROWS) {
      const chunk = result.measurementFills.slice(i, i + CHUNK_ROWS).map((f) => ({ id: f.measurementId, leaf_count: f.leafCount ?? null, root_tips: f.rootTips ?? null }));
      // Only empty counts are filled: the plan refused any that disagree with a stored value.
      await tx.execute(sql`
        update ${measurements} m set
          leaf_count = coalesce(m.leaf_count, j.leaf_count),
          root_tips = coalesce(m.root_tips, j.root_tips),
          version = m.version + 1,
          updated_at = now()
        from json_to_recordset(${JSON.stringify(chunk)}::json) as j(id uuid, leaf_count integer, root_tips integer)
        where m.id = j.id and m.collection_id = ${collectionId}
          and ((m.leaf_count is null and j.leaf_count is not null) or (m.root_tips is null and j.root_tips is not null))`);
      done += chunk.length;
      hooks.onProgress?.(done, total);
    }
    for (let i = 0; i < result.bloomFills.length; i += CHUNK_ROWS) {
      const chunk = result.bloomFills.slice(i, i + CHUNK_ROWS).map((f) => ({
        lead_id: f.leadId,
        buds_seen_on: f.budsSeenOn ?? null,
        first_open_on: f.firstOpenOn ?? null,
        last_faded_on: f.lastFadedOn ?? null,
        flower_count: f.flowerCount ?? null,
        spike_count: f.spikeCount ?? null,
      }));
      // Only empty fields are filled: the plan refused any that disagree with a stored value.
      await tx.execute(sql`
        update ${bloomRecords} b set
          buds_seen_on = coalesce(b.buds_seen_on, j.buds_seen_on),
          first_open_on = coalesce(b.first_open_on, j.first_open_on),
          last_faded_on = coalesce(b.last_faded_on, j.last_faded_on),
          flower_count = coalesce(b.flower_count, j.flower_count),
          spike_count = coalesce(b.spike_count, j.spike_count),
          version = b.version + 1,
          updated_at = now()
        from json_to_recordset(${JSON.stringify(chunk)}::json)
          as j(lead_id uuid, buds_seen_on date, first_open_on date, last_faded_on date, flower_count integer, spike_count integer)
        where b.lead_id = j.lead_id and b.collection_id = ${collectionId}`);
      done += chunk.length;
      hooks.onProgress?.(done, total);
    }

    const remembered: StoredMapping = { columns: options.mapping, dateOrder: options.dateOrder ?? null, heightUnit: options.heightUnit ?? null };
    await tx
      .insert(importMappings)
      .values({ collectionId, headerKey: headerKey(reader.headers), mapping: remembered, updatedBy: userId })
      .onConflictDoUpdate({ target: [importMappings.collectionId, importMappings.headerKey], set: { mapping: remembered, updatedBy: userId, updatedAt: sql`now()` } });
    return result.counts;
  });
}
