import { once } from 'node:events';
import { IMPORT_FIELDS } from '@/shared/import/fields';
import type { Writable } from 'node:stream';
import { ZipArchive } from 'archiver';
import { asc, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import type { Logger } from 'pino';
import type { Role } from '@/shared/schemas/auth';
import { EXPORT_FORMAT, EXPORT_VERSION, type ExportDocument } from '@/shared/schemas/export';
import type { Database } from '../../db/client';
import { areas, bloomRecords, careEntries, collections, leads, measurements, memberships, photos, plants, users } from '../../db/schema';
import { notFound } from '../errors';
import type { PhotoStore } from '../photos/store';
import { photoKey } from './photos';

// ── Spreadsheet safety ────────────────────────────────────────────────────────────────

/**
 * The characters that make a spreadsheet read a cell as a formula when they start it
 * (OWASP, "CSV Injection"): =, +, -, @, tab (0x09) and carriage return (0x0D).
 */
// OWASP's CSV-injection list, and the full-width = + - @ (U+FF1D, U+FF0B, U+FF0D, U+FF20), which
// some spreadsheet programs also take as the start of a formula.
const FORMULA_START = /^[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/;

/**
 * A text cell made safe to open in a spreadsheet: one that starts like a formula gets a leading
 * single quote, so it is shown as text and never run. Only text is escaped: numbers are written
 * as numbers, so a negative height or temperature stays a number (-2 is data, not a formula).
 */
export function escapeFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

export type Cell = string | number | boolean | null | undefined;

/**
 * Excel reads a CSV without a byte-order mark as the computer's legacy code page, which turns
 * "×" and curly quotes into mojibake; with the mark it reads UTF-8. LibreOffice, Numbers, Google
 * Sheets and papaparse all accept (and drop) the mark.
 */
export const UTF8_BOM = '\uFEFF';

/**
 * One CSV file: a header row, then a row per record, RFC 4180 quoting by papaparse (every text
 * cell in double quotes, as OWASP also advises), formula-like text escaped, CRLF line ends.
 */
export function toCsv(columns: readonly string[], rows: ReadonlyArray<Record<string, Cell>>): string {
  const data = rows.map((row) => columns.map((column) => {
    const value = row[column];
    return typeof value === 'string' ? escapeFormula(value) : (value ?? null);
  }));
  const body = Papa.unparse(
    { fields: [...columns], data },
    { quotes: (value: unknown) => typeof value === 'string', newline: '\r\n', header: true },
  );
  // Newlines inside cells are quoted, so trailing ones are papaparse's own; exactly one ends the file.
  return `${UTF8_BOM}${body.replace(/(\r\n)+$/, '')}\r\n`;
}

// ── Reading the collection ────────────────────────────────────────────────────────────

export interface ExportMember {
  displayName: string;
  role: Role;
  memberSince: string;
}

export interface ExportSnapshot {
  document: ExportDocument;
  /**
   * Names and roles only. A backup needs to say who shared the collection, not how to reach
   * them: the file may be copied and passed on, and a restore never brings accounts along,
   * so other members' e-mail addresses stay out.
   */
  members: ExportMember[];
  /** Photo id → its prefix in the photo store. */
  storageKeys: Map<string, string>;
}

/** Every record of one collection as it stood at one moment (one read-only snapshot). */
export async function loadExport(db: Database, collectionId: string, now: Date): Promise<ExportSnapshot> {
  return db.transaction(
    async (tx) => {
      const [collection] = await tx.select().from(collections).where(eq(collections.id, collectionId)).limit(1);
      if (!collection) throw notFound('That collection');
      const areaRows = await tx.select().from(areas).where(eq(areas.collectionId, collectionId)).orderBy(asc(areas.position), asc(areas.name));
      const plantRows = await tx.select().from(plants).where(eq(plants.collectionId, collectionId)).orderBy(asc(plants.tag));
      const leadRows = await tx
        .select({ lead: leads })
        .from(leads)
        .innerJoin(plants, eq(plants.id, leads.plantId))
        .where(eq(leads.collectionId, collectionId))
        .orderBy(asc(plants.tag), asc(leads.season), asc(leads.label));
      const measurementRows = await tx
        .select()
        .from(measurements)
        .where(eq(measurements.collectionId, collectionId))
        .orderBy(asc(measurements.leadId), asc(measurements.measuredOn), asc(measurements.createdAt), asc(measurements.id));
      const bloomRows = await tx.select().from(bloomRecords).where(eq(bloomRecords.collectionId, collectionId)).orderBy(asc(bloomRecords.leadId));
      const careRows = await tx
        .select()
        .from(careEntries)
        .where(eq(careEntries.collectionId, collectionId))
        .orderBy(asc(careEntries.occurredOn), asc(careEntries.createdAt), asc(careEntries.id));
      const photoRows = await tx.select().from(photos).where(eq(photos.collectionId, collectionId)).orderBy(asc(photos.takenOn), asc(photos.createdAt), asc(photos.id));
      const memberRows = await tx
        .select({ displayName: users.displayName, role: memberships.role, since: memberships.createdAt })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(eq(memberships.collectionId, collectionId))
        .orderBy(asc(memberships.createdAt));

      // Measurements in the order of their leads (plant tag, season, label), then by date.
      const leadOrder = new Map(leadRows.map(({ lead }, i) => [lead.id, i]));
      const byLead = (a: { leadId: string }, b: { leadId: string }) => (leadOrder.get(a.leadId) ?? 0) - (leadOrder.get(b.leadId) ?? 0);
      const sortedMeasurements = [...measurementRows].sort(byLead);
      const sortedBlooms = [...bloomRows].sort(byLead);

      const document: ExportDocument = {
        format: EXPORT_FORMAT,
        version: EXPORT_VERSION,
        exportedAt: now.toISOString(),
        collection: {
          name: collection.name,
          seasonStartMonth: collection.seasonStartMonth,
          units: collection.units,
          latitude: collection.latitude,
          longitude: collection.longitude,
        },
        areas: areaRows.map((a) => ({ id: a.id, name: a.name, indoors: a.indoors, position: a.position, notes: a.notes })),
        plants: plantRows.map((p) => ({
          id: p.id,
          tag: p.tag,
          genus: p.genus,
          epithet: p.epithet,
          isSpecies: p.isSpecies,
          clonalName: p.clonalName,
          source: p.source,
          acquiredOn: p.acquiredOn,
          areaId: p.areaId,
          medium: p.medium,
          notes: p.notes,
          parentPlantId: p.parentPlantId,
          dividedOn: p.dividedOn,
          roundPosition: p.roundPosition,
          minNightTempC: p.minNightTempC,
          historyOnly: p.historyOnly,
          givenAwayOn: p.givenAwayOn,
          givenTo: p.givenTo,
          receivedFrom: p.receivedFrom,
        })),
        leads: leadRows.map(({ lead: l }) => ({
          id: l.id,
          plantId: l.plantId,
          season: l.season,
          label: l.label,
          firstSeen: l.firstSeen,
          parentLeadId: l.parentLeadId,
          status: l.status,
          fromBackBulb: l.fromBackBulb,
        })),
        measurements: sortedMeasurements.map((m) => ({
          id: m.id,
          leadId: m.leadId,
          date: m.measuredOn,
          heightMm: m.heightMm,
          leafCount: m.leafCount,
          sheath: m.sheath,
          rootTips: m.rootTips,
          bulbWidthMm: m.bulbWidthMm,
          note: m.note,
        })),
        bloomRecords: sortedBlooms.map((b) => ({
          id: b.id,
          leadId: b.leadId,
          budsSeenOn: b.budsSeenOn,
          firstOpenOn: b.firstOpenOn,
          lastFadedOn: b.lastFadedOn,
          flowerCount: b.flowerCount,
          spikeCount: b.spikeCount,
          note: b.note,
        })),
        careEntries: careRows.map((c) => ({
          id: c.id,
          plantId: c.plantId,
          areaId: c.areaId,
          kind: c.kind,
          occurredOn: c.occurredOn,
          withCalcium: c.withCalcium,
          newMedium: c.newMedium,
          product: c.product,
          target: c.target,
          toAreaId: c.toAreaId,
          damageKind: c.damageKind,
          note: c.note,
        })),
        photos: photoRows.map((p) => ({
          id: p.id,
          plantId: p.plantId,
          leadId: p.leadId,
          measurementId: p.measurementId,
          takenOn: p.takenOn,
          width: p.width,
          height: p.height,
          caption: p.caption,
          file: photoFileName(p.id),
        })),
      };
      return {
        document,
        members: memberRows.map((m) => ({ displayName: m.displayName, role: m.role, memberSince: m.since.toISOString().slice(0, 10) })),
        storageKeys: new Map(photoRows.map((p) => [p.id, p.storageKey])),
      };
    },
    { isolationLevel: 'repeatable read', accessMode: 'read only' },
  );
}

export const photoFileName = (photoId: string) => `photos/${photoId}.webp`;

// ── File names ────────────────────────────────────────────────────────────────────────

/** "Saltmarsh Lane shade house" → "saltmarsh-lane-shade-house": ASCII letters, digits and dashes only. */
export function slugify(name: string): string {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/, '');
  return slug || 'collection';
}

/** The download's name: nothing from the collection's name survives but letters, digits and dashes. */
export function exportFileName(collectionName: string, now: Date, extension: 'zip' | 'json'): string {
  return `sympodia-${slugify(collectionName)}-${now.toISOString().slice(0, 10)}.${extension}`;
}

// ── The CSV files ─────────────────────────────────────────────────────────────────────

/** Columns of the flat sheet: the spreadsheet import's own field names, so it maps itself. */
export const RECORDS_COLUMNS = IMPORT_FIELDS;

export interface CsvFile {
  name: string;
  columns: readonly string[];
  rows: Array<Record<string, Cell>>;
}

/** One CSV per table, plus the flat records.csv: the same records as the JSON document. */
export function csvFiles(snapshot: ExportSnapshot, photoFiles?: ReadonlySet<string>): CsvFile[] {
  const doc = snapshot.document;
  const areaName = new Map(doc.areas.map((a) => [a.id, a.name]));
  const plantById = new Map(doc.plants.map((p) => [p.id, p]));
  const leadById = new Map(doc.leads.map((l) => [l.id, l]));
  const tagOf = (plantId: string | null) => (plantId ? (plantById.get(plantId)?.tag ?? null) : null);
  const leadCells = (leadId: string) => {
    const lead = leadById.get(leadId);
    return { lead_id: leadId, plant_tag: lead ? tagOf(lead.plantId) : null, lead_label: lead?.label ?? null };
  };

  const measurementsByLead = new Map<string, ExportDocument['measurements']>();
  for (const m of doc.measurements) {
    const list = measurementsByLead.get(m.leadId) ?? [];
    list.push(m);
    measurementsByLead.set(m.leadId, list);
  }
  const bloomByLead = new Map(doc.bloomRecords.map((b) => [b.leadId, b]));

  const records: Array<Record<string, Cell>> = [];
  for (const lead of doc.leads) {
    const plant = plantById.get(lead.plantId);
    const bloom = bloomByLead.get(lead.id);
    const shared = {
      tag: plant?.tag,
      genus: plant?.genus,
      epithet: plant?.epithet,
      clonal_name: plant?.clonalName,
      lead: lead.label,
      season: lead.season,
      buds_seen: bloom?.budsSeenOn,
      first_open: bloom?.firstOpenOn,
      last_faded: bloom?.lastFadedOn,
      flowers: bloom?.flowerCount,
      spikes: bloom?.spikeCount,
    };
    const list = measurementsByLead.get(lead.id) ?? [];
    // A lead not yet measured still gets its row, so its bloom record and season are not lost.
    if (list.length === 0) records.push(shared);
    for (const m of list) {
      records.push({ ...shared, date: m.date, height_mm: m.heightMm, leaves: m.leafCount, sheath: m.sheath, root_tips: m.rootTips });
    }
  }

  return [
    {
      name: 'collection.csv',
      columns: ['name', 'season_start_month', 'units', 'latitude', 'longitude', 'exported_at', 'format', 'format_version'],
      rows: [
        {
          name: doc.collection.name,
          season_start_month: doc.collection.seasonStartMonth,
          units: doc.collection.units,
          latitude: doc.collection.latitude,
          longitude: doc.collection.longitude,
          exported_at: doc.exportedAt,
          format: doc.format,
          format_version: doc.version,
        },
      ],
    },
    {
      name: 'areas.csv',
      columns: ['id', 'name', 'indoors', 'position', 'notes'],
      rows: doc.areas.map((a) => ({ id: a.id, name: a.name, indoors: a.indoors, position: a.position, notes: a.notes })),
    },
    {
      name: 'plants.csv',
      columns: [
        'id', 'tag', 'genus', 'epithet', 'is_species', 'clonal_name', 'source', 'acquired_on', 'area_id', 'area_name', 'medium', 'notes',
        'parent_plant_id', 'parent_tag', 'divided_on', 'round_position', 'min_night_temp_c', 'history_only', 'given_away_on', 'given_to', 'received_from',
      ],
      rows: doc.plants.map((p) => ({
        id: p.id,
        tag: p.tag,
        genus: p.genus,
        epithet: p.epithet,
        is_species: p.isSpecies,
        clonal_name: p.clonalName,
        source: p.source,
        acquired_on: p.acquiredOn,
        area_id: p.areaId,
        area_name: p.areaId ? areaName.get(p.areaId) : null,
        medium: p.medium,
        notes: p.notes,
        parent_plant_id: p.parentPlantId,
        parent_tag: tagOf(p.parentPlantId),
        divided_on: p.dividedOn,
        round_position: p.roundPosition,
        min_night_temp_c: p.minNightTempC,
        history_only: p.historyOnly,
        given_away_on: p.givenAwayOn,
        given_to: p.givenTo,
        received_from: p.receivedFrom,
      })),
    },
    {
      name: 'leads.csv',
      columns: ['id', 'plant_id', 'plant_tag', 'season', 'label', 'first_seen', 'parent_lead_id', 'status', 'from_back_bulb'],
      rows: doc.leads.map((l) => ({
        id: l.id,
        plant_id: l.plantId,
        plant_tag: tagOf(l.plantId),
        season: l.season,
        label: l.label,
        first_seen: l.firstSeen,
        parent_lead_id: l.parentLeadId,
        status: l.status,
        from_back_bulb: l.fromBackBulb,
      })),
    },
    {
      name: 'measurements.csv',
      columns: ['id', 'lead_id', 'plant_tag', 'lead_label', 'date', 'height_mm', 'leaf_count', 'sheath', 'root_tips', 'bulb_width_mm', 'note'],
      rows: doc.measurements.map((m) => ({
        id: m.id,
        ...leadCells(m.leadId),
        date: m.date,
        height_mm: m.heightMm,
        leaf_count: m.leafCount,
        sheath: m.sheath,
        root_tips: m.rootTips,
        bulb_width_mm: m.bulbWidthMm,
        note: m.note,
      })),
    },
    {
      name: 'bloom_records.csv',
      columns: ['id', 'lead_id', 'plant_tag', 'lead_label', 'buds_seen_on', 'first_open_on', 'last_faded_on', 'flower_count', 'spike_count', 'note'],
      rows: doc.bloomRecords.map((b) => ({
        id: b.id,
        ...leadCells(b.leadId),
        buds_seen_on: b.budsSeenOn,
        first_open_on: b.firstOpenOn,
        last_faded_on: b.lastFadedOn,
        flower_count: b.flowerCount,
        spike_count: b.spikeCount,
        note: b.note,
      })),
    },
    {
      name: 'care_entries.csv',
      columns: [
        'id', 'plant_id', 'plant_tag', 'area_id', 'area_name', 'kind', 'occurred_on', 'with_calcium', 'new_medium', 'product', 'target',
        'to_area_id', 'to_area_name', 'damage_kind', 'note',
      ],
      rows: doc.careEntries.map((c) => ({
        id: c.id,
        plant_id: c.plantId,
        plant_tag: tagOf(c.plantId),
        area_id: c.areaId,
        area_name: c.areaId ? areaName.get(c.areaId) : null,
        kind: c.kind,
        occurred_on: c.occurredOn,
        with_calcium: c.withCalcium,
        new_medium: c.newMedium,
        product: c.product,
        target: c.target,
        to_area_id: c.toAreaId,
        to_area_name: c.toAreaId ? areaName.get(c.toAreaId) : null,
        damage_kind: c.damageKind,
        note: c.note,
      })),
    },
    {
      name: 'photos.csv',
      columns: ['id', 'plant_id', 'plant_tag', 'lead_id', 'measurement_id', 'taken_on', 'width', 'height', 'caption', 'file'],
      rows: doc.photos.map((p) => ({
        id: p.id,
        plant_id: p.plantId,
        plant_tag: tagOf(p.plantId),
        lead_id: p.leadId,
        measurement_id: p.measurementId,
        taken_on: p.takenOn,
        width: p.width,
        height: p.height,
        caption: p.caption,
        // Blank when the zip leaves the pictures out, or the store no longer has this one.
        file: !photoFiles || photoFiles.has(p.file) ? p.file : null,
      })),
    },
    {
      name: 'members.csv',
      columns: ['display_name', 'role', 'member_since'],
      rows: snapshot.members.map((m) => ({ display_name: m.displayName, role: m.role, member_since: m.memberSince })),
    },
    { name: 'records.csv', columns: RECORDS_COLUMNS, rows: records },
  ];
}

/** The zip's README.txt: what each file holds, in plain words. */
export function readme(snapshot: ExportSnapshot, withPhotos: boolean): string {
  const doc = snapshot.document;
  const lines = [
    `Sympodia export of "${doc.collection.name}"`,
    `Made ${doc.exportedAt} (UTC). Format ${doc.format}, version ${doc.version}.`,
    '',
    'What is in this archive',
    '',
    'records.csv        One row per measurement: the plant (tag, genus, epithet, clonal name), the lead',
    '                   (label, season), the measurement and the lead\'s bloom dates and counts, which repeat',
    '                   on every row of the lead. A lead without measurements has one row with no date.',
    '                   The column names are the ones Sympodia\'s spreadsheet import recognises, so the',
    '                   file can be imported again without mapping columns by hand.',
    'collection.csv     The collection\'s settings: name, month the growth year starts, display units, location.',
    'areas.csv          Benches, shelves and other places plants live, in walking order.',
    'plants.csv         Every plant, with its area and, for a division, the plant it was divided from.',
    'leads.csv          Every lead, by plant and season, with its status and the lead it broke from.',
    'measurements.csv   Every measurement of every lead.',
    'bloom_records.csv  Buds, first flower, last flower, flower and spike counts per lead.',
    'care_entries.csv   Watering, feeding, repotting, treatments, moves, damage and notes.',
    'photos.csv         What each photo shows and when it was taken.',
    withPhotos
      ? 'photos/            The photos themselves (WebP, longest side 1600 pixels), named as in photos.csv.'
      : 'photos/            Left out of this archive at your request; photos.csv still describes them.',
    'members.csv        Who shares the collection and in which role. E-mail addresses are left out.',
    '',
    'How the files are written',
    '',
    '- UTF-8 with a byte-order mark (so Excel shows accents and symbols correctly), comma-separated,',
    '  text in double quotes, one header row.',
    '- Sizes are always millimetres, whatever the collection shows on screen. Dates are YYYY-MM-DD.',
    '- Text that begins with = + - @, a tab or a carriage return starts with an extra single quote (\'),',
    '  so a spreadsheet shows it as text instead of running it as a formula. Numbers are never changed.',
    '- The id columns link the files to each other (a lead\'s plant_id is a plant\'s id).',
    '',
    'For a full restore into another Sympodia collection, download the JSON export as well: it holds',
    'the same records in one file, and Collection settings > Export can restore it into an empty collection.',
    '',
  ];
  return lines.join('\r\n');
}

/**
 * Streams the zip into `out`: README, the CSV files, then (unless `store` is null) each photo's
 * display file, one at a time so a large collection never sits in memory. An error or a reader
 * who goes away stops the archive.
 */
export async function writeExportZip(
  out: Writable,
  snapshot: ExportSnapshot,
  { store, logger }: { store: PhotoStore | null; logger: Logger },
): Promise<void> {
  const archive = new ZipArchive({ zlib: { level: 6 } });
  let failed: Error | null = null;
  let stopped: () => void = () => {};
  const stopping = new Promise<void>((resolve) => {
    stopped = resolve;
  });
  const stop = (error: Error) => {
    if (failed) return;
    failed = error;
    stopped();
    archive.abort();
  };
  archive.on('warning', (error) => logger.warn({ err: error }, 'export archive warning'));
  archive.on('error', stop);
  out.on('close', () => {
    if (!out.writableFinished) stop(new Error('The reader went away before the export was complete'));
  });
  archive.pipe(out);

  const date = new Date(snapshot.document.exportedAt);
  const withPhotos = store !== null;
  archive.append(readme(snapshot, withPhotos), { name: 'README.txt', date });

  const present = new Set<string>();
  if (store) {
    for (const photo of snapshot.document.photos) {
      if (failed) break;
      const key = snapshot.storageKeys.get(photo.id);
      const data = key ? await store.get(photoKey(key, 'display')) : null;
      if (!data) {
        logger.warn({ photoId: photo.id }, 'photo file missing from the store; left out of the export');
        continue;
      }
      present.add(photo.file);
      const written = once(archive, 'entry').then(() => undefined, () => undefined);
      // WebP is already compressed: stored as is, deflate would only spend time.
      archive.append(data, { name: photo.file, date, store: true });
      // The next photo is fetched only once this one is in the archive (or the archive stopped).
      await Promise.race([written, stopping]);
    }
  }
  if (!failed) {
    for (const file of csvFiles(snapshot, withPhotos ? present : new Set())) {
      archive.append(toCsv(file.columns, file.rows), { name: file.name, date });
    }
    await Promise.race([archive.finalize(), stopping]);
  }
  if (failed) throw failed;
}
