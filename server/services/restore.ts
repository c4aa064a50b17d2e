import { randomUUID } from 'node:crypto';
import { eq, getTableColumns, sql } from 'drizzle-orm';
import type { PgTable } from 'drizzle-orm/pg-core';
import type { ExportDocument, RestoreResult } from '@/shared/schemas/export';
import type { Database } from '../../db/client';
import { areas, bloomRecords, careEntries, collections, leads, measurements, photos, plants } from '../../db/schema';
import { HttpError, notFound } from '../errors';
import { latestAllowedDate, type Executor } from './records-support';

/** Rows per INSERT statement. */
const CHUNK_ROWS = 2000;

/**
 * Inserts rows `CHUNK_ROWS` at a time, each chunk as one JSON parameter expanded by
 * `json_populate_recordset` on the server: no parameter limit, and far less work per row than
 * a VALUES list built by the query builder (a 70,000-measurement restore took 12 s that way).
 * Columns not in the rows (version, timestamps) take their defaults.
 */
async function insertChunked<T>(tx: Executor, table: PgTable, records: ReadonlyArray<T>, toRow: (record: T) => Record<string, unknown>): Promise<void> {
  if (records.length === 0) return;
  const columns = getTableColumns(table) as Record<string, { name: string }>;
  const keys = Object.keys(toRow(records[0]));
  const names = keys.map((key) => columns[key].name);
  const list = sql.join(
    names.map((name) => sql.identifier(name)),
    sql`, `,
  );
  // Rows are made a chunk at a time: a 60 MB file's records are not copied whole a second time.
  for (let i = 0; i < records.length; i += CHUNK_ROWS) {
    const json = JSON.stringify(
      records.slice(i, i + CHUNK_ROWS).map((record) => {
        const row = toRow(record);
        return Object.fromEntries(keys.map((key, k) => [names[k], row[key]]));
      }),
    );
    await tx.execute(sql`insert into ${table} (${list}) select ${list} from json_populate_recordset(null::${table}, ${json}::json)`);
  }
}

/**
 * Parents before children (a division after the plant it came from, a lead after the lead it
 * broke from), so each chunk's references already exist. The schema has refused cycles.
 */
export function parentsFirst<T extends { id: string }>(rows: readonly T[], parentOf: (row: T) => string | null): T[] {
  const byId = new Map(rows.map((r) => [r.id, r]));
  const placed = new Set<string>();
  const out: T[] = [];
  const place = (row: T) => {
    const chain: T[] = [];
    for (let at: T | undefined = row; at && !placed.has(at.id); ) {
      chain.push(at);
      const parent = parentOf(at);
      at = parent ? byId.get(parent) : undefined;
      if (at && chain.includes(at)) break;
    }
    for (const r of chain.reverse()) {
      if (placed.has(r.id)) continue;
      placed.add(r.id);
      out.push(r);
    }
  };
  rows.forEach(place);
  return out;
}

/** The first date in the file later than the product accepts (tomorrow, UTC), with its path. */
function firstFutureDate(doc: ExportDocument): { field: string; date: string } | null {
  const latest = latestAllowedDate();
  const lists: Array<[string, ReadonlyArray<Record<string, unknown>>, string[]]> = [
    ['plants', doc.plants, ['acquiredOn', 'dividedOn', 'givenAwayOn']],
    ['leads', doc.leads, ['firstSeen']],
    ['measurements', doc.measurements, ['date']],
    ['bloomRecords', doc.bloomRecords, ['budsSeenOn', 'firstOpenOn', 'lastFadedOn']],
    ['careEntries', doc.careEntries, ['occurredOn']],
  ];
  for (const [name, rows, fields] of lists) {
    for (let i = 0; i < rows.length; i++) {
      for (const field of fields) {
        const value = rows[i][field];
        if (typeof value === 'string' && value > latest) return { field: `${name}.${i}.${field}`, date: value };
      }
    }
  }
  return null;
}

export const notEmpty = () =>
  new HttpError(
    409,
    'collection_not_empty',
    'A restore goes into an empty collection only, and this one already has records. Create a new collection and restore into that; nothing was changed.',
  );

/**
 * Writes a whole export document into an empty collection, in one transaction: every record
 * gets a fresh id and every reference (areas, divisions, leads broken from leads, care entries'
 * areas) is rewritten to the new ids. The collection keeps its name and takes the file's
 * settings. Photo rows are left out: the JSON holds no picture files, and a row without its
 * files would show a broken image. Refuses (409, nothing written) when the collection has any
 * record already.
 */
export async function restoreCollection(db: Database, collectionId: string, userId: string, doc: ExportDocument): Promise<RestoreResult> {
  const future = firstFutureDate(doc);
  if (future) {
    const reason = `${future.date} is in the future; a restore takes records up to today`;
    throw new HttpError(400, 'invalid_input', 'Some fields need attention', [{ field: future.field, reason }]);
  }

  return db.transaction(async (tx) => {
    // The row lock makes a second restore into the same collection wait, then find it full.
    const [collection] = await tx.select({ id: collections.id }).from(collections).where(eq(collections.id, collectionId)).for('update');
    if (!collection) throw notFound('That collection');
    const [{ filled }] = await tx.execute<{ filled: boolean }>(sql`
      select exists (select 1 from ${areas} where ${areas.collectionId} = ${collectionId})
          or exists (select 1 from ${plants} where ${plants.collectionId} = ${collectionId})
          or exists (select 1 from ${careEntries} where ${careEntries.collectionId} = ${collectionId})
          or exists (select 1 from ${photos} where ${photos.collectionId} = ${collectionId}) as filled`);
    if (filled) throw notEmpty();

    const settings = {
      seasonStartMonth: doc.collection.seasonStartMonth,
      units: doc.collection.units,
      latitude: doc.collection.latitude,
      longitude: doc.collection.longitude,
    };
    await tx.update(collections).set(settings).where(eq(collections.id, collectionId));

    const fresh = (list: ReadonlyArray<{ id: string }>) => new Map(list.map((row) => [row.id, randomUUID()]));
    const areaIds = fresh(doc.areas);
    const plantIds = fresh(doc.plants);
    const leadIds = fresh(doc.leads);
    // The schema has checked every reference, so a lookup only misses for a null one.
    const map = (ids: Map<string, string>, id: string | null) => (id === null ? null : (ids.get(id) ?? null));
    const must = (ids: Map<string, string>, id: string) => ids.get(id)!;

    await insertChunked(
      tx,
      areas,
      doc.areas,
      (a) => ({ id: must(areaIds, a.id), collectionId, name: a.name, indoors: a.indoors, position: a.position, notes: a.notes }),
    );
    await insertChunked(
      tx,
      plants,
      parentsFirst(doc.plants, (p) => p.parentPlantId),
      (p) => ({
        id: must(plantIds, p.id),
        collectionId,
        tag: p.tag,
        genus: p.genus,
        epithet: p.epithet,
        isSpecies: p.isSpecies,
        clonalName: p.clonalName,
        source: p.source,
        acquiredOn: p.acquiredOn,
        areaId: map(areaIds, p.areaId),
        medium: p.medium,
        notes: p.notes,
        parentPlantId: map(plantIds, p.parentPlantId),
        dividedOn: p.dividedOn,
        roundPosition: p.roundPosition,
        minNightTempC: p.minNightTempC,
        historyOnly: p.historyOnly,
        givenAwayOn: p.givenAwayOn,
        givenTo: p.givenTo,
        receivedFrom: p.receivedFrom,
        createdBy: userId,
      }),
    );
    await insertChunked(
      tx,
      leads,
      parentsFirst(doc.leads, (l) => l.parentLeadId),
      (l) => ({
        id: must(leadIds, l.id),
        collectionId,
        plantId: must(plantIds, l.plantId),
        season: l.season,
        label: l.label,
        firstSeen: l.firstSeen,
        parentLeadId: map(leadIds, l.parentLeadId),
        status: l.status,
        fromBackBulb: l.fromBackBulb,
      }),
    );
    await insertChunked(
      tx,
      measurements,
      doc.measurements,
      (m) => ({
        id: randomUUID(),
        collectionId,
        leadId: must(leadIds, m.leadId),
        measuredOn: m.date,
        heightMm: m.heightMm,
        leafCount: m.leafCount,
        sheath: m.sheath,
        rootTips: m.rootTips,
        bulbWidthMm: m.bulbWidthMm,
        note: m.note,
        createdBy: userId,
      }),
    );
    await insertChunked(
      tx,
      bloomRecords,
      doc.bloomRecords,
      (b) => ({
        id: randomUUID(),
        collectionId,
        leadId: must(leadIds, b.leadId),
        budsSeenOn: b.budsSeenOn,
        firstOpenOn: b.firstOpenOn,
        lastFadedOn: b.lastFadedOn,
        flowerCount: b.flowerCount,
        spikeCount: b.spikeCount,
        note: b.note,
      }),
    );
    await insertChunked(
      tx,
      careEntries,
      doc.careEntries,
      (c) => ({
        id: randomUUID(),
        collectionId,
        plantId: map(plantIds, c.plantId),
        areaId: map(areaIds, c.areaId),
        kind: c.kind,
        occurredOn: c.occurredOn,
        withCalcium: c.withCalcium,
        newMedium: c.newMedium,
        product: c.product,
        target: c.target,
        toAreaId: map(areaIds, c.toAreaId),
        damageKind: c.damageKind,
        note: c.note,
        createdBy: userId,
      }),
    );

    return {
      restored: {
        areas: doc.areas.length,
        plants: doc.plants.length,
        leads: doc.leads.length,
        measurements: doc.measurements.length,
        bloomRecords: doc.bloomRecords.length,
        careEntries: doc.careEntries.length,
      },
      photosSkipped: doc.photos.length,
      settings,
      exportedFrom: doc.collection.name,
    };
  });
}
