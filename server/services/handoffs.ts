import { randomUUID } from 'node:crypto';
import { and, asc, eq, gt, inArray, isNull, ne } from 'drizzle-orm';
import type { Logger } from 'pino';
import type { Role } from '@/shared/schemas/auth';
import type { AcceptedHandoff, AcceptHandoffInput, Handoff, HandoffContents, HandoffPreview } from '@/shared/schemas/handoffs';
import { HANDOFF_LIFETIME_DAYS } from '@/shared/schemas/handoffs';
import { plantDisplayName } from '@/shared/plant-name';
import type { Database } from '../../db/client';
import { bloomRecords, divisionHandoffs, leads, measurements, memberships, photos, plants, users } from '../../db/schema';
import { fieldError, HttpError, notFound } from '../errors';
import { escapeHtml, type Mailer } from '../mail/mailer';
import { hashToken, newToken } from '../mail/tokens';
import type { PhotoStore } from '../photos/store';
import { createCollectionFor } from './collections';
import { photoKey } from './photos';
import { requirePlant } from './plants';
import { type Executor, readOnlyCopy } from './records-support';

export const HANDOFF_LIFETIME_MS = HANDOFF_LIFETIME_DAYS * 24 * 60 * 60 * 1000;

/** Lineage deeper than this is not followed (a guard; real lineages are a handful deep). */
const MAX_ANCESTORS = 50;
/** Rows per INSERT when copying, well inside PostgreSQL's 65,535 parameters. */
const INSERT_CHUNK = 500;

type Member = { collectionId: string; userId: string; role: Role };
type PlantRow = typeof plants.$inferSelect;
type LeadRow = typeof leads.$inferSelect;
type MeasurementRow = typeof measurements.$inferSelect;
type BloomRow = typeof bloomRecords.$inferSelect;
type PhotoRow = typeof photos.$inferSelect;
type HandoffRow = typeof divisionHandoffs.$inferSelect;

const todayOf = (now: Date) => now.toISOString().slice(0, 10);

// ── Listing, sending, revoking ───────────────────────────────────────────────────────────

/** Pending hand-offs of a collection (or of one plant of it): not accepted, revoked or expired. */
export async function pendingHandoffs(
  db: Database,
  member: Member,
  plantId: string | null,
  now = new Date(),
): Promise<Handoff[]> {
  if (plantId) await requirePlant(db, member.collectionId, plantId);
  const rows = await db
    .select({ handoff: divisionHandoffs, plantTag: plants.tag, sentBy: users.displayName })
    .from(divisionHandoffs)
    .innerJoin(plants, eq(plants.id, divisionHandoffs.plantId))
    .leftJoin(users, eq(users.id, divisionHandoffs.sentBy))
    .where(
      and(
        eq(divisionHandoffs.collectionId, member.collectionId),
        plantId ? eq(divisionHandoffs.plantId, plantId) : undefined,
        isNull(divisionHandoffs.acceptedAt),
        isNull(divisionHandoffs.revokedAt),
        gt(divisionHandoffs.expiresAt, now),
      ),
    )
    .orderBy(asc(divisionHandoffs.createdAt));
  return rows.map(({ handoff, plantTag, sentBy }) => ({
    id: handoff.id,
    plantId: handoff.plantId,
    plantTag,
    recipientEmail: handoff.recipientEmail,
    note: handoff.note,
    sentBy,
    canRevoke: member.role === 'owner' || handoff.sentBy === member.userId,
    expiresAt: handoff.expiresAt.toISOString(),
    createdAt: handoff.createdAt.toISOString(),
  }));
}

/** Refuses to hand over a plant that is itself a history copy or has already gone (409). */
function assertGivable(plant: PlantRow): void {
  if (plant.historyOnly) throw readOnlyCopy();
  if (plant.givenAwayOn) {
    throw new HttpError(409, 'given_away', `This plant was already given to ${plant.givenTo ?? 'someone'} on ${plant.givenAwayOn}`);
  }
}

/** Stores a hand-off and mails its link; the mail goes out after the row is committed. */
export async function createHandoff(
  db: Database,
  mailer: Mailer,
  input: { member: Member; plantId: string; email: string; note: string | null; sender: { id: string; displayName: string } },
  now = new Date(),
  logger?: Logger,
): Promise<Handoff> {
  const { member } = input;
  const plant = await requirePlant(db, member.collectionId, input.plantId);
  assertGivable(plant);
  const contents = await gatherLineage(db, member.collectionId, plant).then(countsOf);

  const { token, hash } = newToken();
  const expiresAt = new Date(now.getTime() + HANDOFF_LIFETIME_MS);
  const [row] = await db
    .insert(divisionHandoffs)
    .values({
      collectionId: member.collectionId,
      plantId: plant.id,
      recipientEmail: input.email,
      note: input.note,
      tokenHash: hash,
      sentBy: input.sender.id,
      expiresAt,
    })
    .returning();

  const link = `${mailer.publicUrl}/handoff/${token}`;
  const giver = input.sender.displayName;
  const name = `${plantDisplayName(plant)} (tag ${plant.tag})`;
  const expires = expiresAt.toISOString().slice(0, 10);
  const what = historyWords(contents);
  const mail = {
    to: input.email,
    subject: `${giver} is handing you a division of ${plantDisplayName(plant)} on Sympodia`,
    text: [
      `${giver} is handing you ${plant.dividedOn ? `a division (divided ${plant.dividedOn})` : 'a plant'}: ${name}.`,
      `It comes with ${what}, so its forecasts start from real history.`,
      ...(input.note ? ['', `${giver} wrote: ${input.note}`] : []),
      '',
      `Open this link to take it into one of your collections (it works once, until ${expires}):`,
      link,
      '',
      `Sign in, or create an account, with this address (${input.email}) to accept it.`,
      'If you did not expect this, ignore this mail; nothing happens until the link is opened.',
    ].join('\n'),
    html: `<p>${escapeHtml(giver)} is handing you ${plant.dividedOn ? `a division (divided ${plant.dividedOn})` : 'a plant'}: <strong>${escapeHtml(name)}</strong>.</p>
<p>It comes with ${escapeHtml(what)}, so its forecasts start from real history.</p>
${input.note ? `<p>${escapeHtml(giver)} wrote: ${escapeHtml(input.note)}</p>` : ''}
<p><a href="${escapeHtml(link)}">Take the division into your collection</a> (it works once, until ${expires}).</p>
<p>Sign in, or create an account, with this address (${escapeHtml(input.email)}) to accept it.</p>
<p>If you did not expect this, ignore this mail; nothing happens until the link is opened.</p>`,
  };
  try {
    await mailer.send(mail);
  } catch (error) {
    // A hand-off nobody received would sit in the pending list looking sent.
    await db.delete(divisionHandoffs).where(eq(divisionHandoffs.id, row.id));
    logger?.error({ err: error }, 'hand-off mail failed');
    throw new HttpError(503, 'mail_unavailable', 'The hand-off could not be mailed just now; try again in a minute');
  }
  return {
    id: row.id,
    plantId: row.plantId,
    plantTag: plant.tag,
    recipientEmail: row.recipientEmail,
    note: row.note,
    sentBy: giver,
    canRevoke: true,
    expiresAt: row.expiresAt.toISOString(),
    createdAt: row.createdAt.toISOString(),
  };
}

/** The sender or an owner may withdraw a pending hand-off. */
export async function revokeHandoff(db: Database, member: Member, handoffId: string, now = new Date()): Promise<void> {
  const [row] = await db
    .select({ id: divisionHandoffs.id, sentBy: divisionHandoffs.sentBy })
    .from(divisionHandoffs)
    .where(
      and(
        eq(divisionHandoffs.id, handoffId),
        eq(divisionHandoffs.collectionId, member.collectionId),
        isNull(divisionHandoffs.acceptedAt),
        isNull(divisionHandoffs.revokedAt),
      ),
    )
    .limit(1);
  if (!row) throw notFound('That pending hand-off');
  if (member.role !== 'owner' && row.sentBy !== member.userId) {
    throw new HttpError(403, 'forbidden', 'Only the person who sent this hand-off or an owner can withdraw it');
  }
  await db
    .update(divisionHandoffs)
    .set({ revokedAt: now })
    .where(and(eq(divisionHandoffs.id, row.id), isNull(divisionHandoffs.acceptedAt), isNull(divisionHandoffs.revokedAt)));
}

// ── What travels with a division ─────────────────────────────────────────────────────────

interface Ancestor {
  plant: PlantRow;
  /** History of this ancestor up to this date belongs to the division's lineage. */
  cutoff: string;
}

interface Lineage {
  division: PlantRow;
  /** Parent first, then grandparent, … as far as the collection has them. */
  ancestors: Ancestor[];
  leads: LeadRow[];
  measurements: MeasurementRow[];
  blooms: BloomRow[];
  photos: PhotoRow[];
  historyLeadIds: Set<string>;
}

/**
 * The division's records and its ancestors' history, as the engine sees a division's
 * inheritance: from each ancestor, the leads first seen before the earliest division on the
 * way down (`cutoff`), their measurements dated on or before it, and their bloom records with
 * later dates dropped; photos of the division, and of the copied history up to the cutoff.
 */
export async function gatherLineage(db: Executor, collectionId: string, division: PlantRow): Promise<Lineage> {
  const ancestors: Ancestor[] = [];
  const seen = new Set([division.id]);
  let cutoff = division.dividedOn;
  let parentId = division.parentPlantId;
  while (parentId && cutoff && !seen.has(parentId) && ancestors.length < MAX_ANCESTORS) {
    const [parent] = await db
      .select()
      .from(plants)
      .where(and(eq(plants.id, parentId), eq(plants.collectionId, collectionId)))
      .limit(1);
    if (!parent) break;
    seen.add(parent.id);
    ancestors.push({ plant: parent, cutoff });
    if (parent.dividedOn && parent.dividedOn < cutoff) cutoff = parent.dividedOn;
    parentId = parent.dividedOn ? parent.parentPlantId : null;
  }
  const cutoffOf = new Map(ancestors.map((a) => [a.plant.id, a.cutoff]));

  const plantIds = [division.id, ...ancestors.map((a) => a.plant.id)];
  const allLeads = await db
    .select()
    .from(leads)
    .where(and(eq(leads.collectionId, collectionId), inArray(leads.plantId, plantIds)))
    .orderBy(asc(leads.season), asc(leads.firstSeen), asc(leads.label));
  const keptLeads = allLeads.filter((l) => {
    const limit = cutoffOf.get(l.plantId);
    return limit === undefined || l.firstSeen < limit;
  });
  const leadCutoff = new Map(keptLeads.map((l) => [l.id, cutoffOf.get(l.plantId)]));
  const leadIds = keptLeads.map((l) => l.id);
  const historyLeadIds = new Set(keptLeads.filter((l) => l.plantId !== division.id).map((l) => l.id));

  const [allMeasurements, allBlooms, allPhotos] = leadIds.length
    ? await Promise.all([
        db.select().from(measurements).where(inArray(measurements.leadId, leadIds)).orderBy(asc(measurements.measuredOn), asc(measurements.id)),
        db.select().from(bloomRecords).where(inArray(bloomRecords.leadId, leadIds)),
        db.select().from(photos).where(and(eq(photos.collectionId, collectionId), inArray(photos.plantId, plantIds))).orderBy(asc(photos.takenOn)),
      ])
    : [[], [], await db.select().from(photos).where(and(eq(photos.collectionId, collectionId), inArray(photos.plantId, plantIds)))];

  const keptMeasurements = allMeasurements.filter((m) => {
    const limit = leadCutoff.get(m.leadId);
    return limit === undefined || m.measuredOn <= limit;
  });
  const measurementIds = new Set(keptMeasurements.map((m) => m.id));
  const keptBlooms: BloomRow[] = [];
  for (const b of allBlooms) {
    const limit = leadCutoff.get(b.leadId);
    if (limit === undefined) {
      keptBlooms.push(b);
      continue;
    }
    const within = (d: string | null) => (d && d <= limit ? d : null);
    const trimmed = { ...b, budsSeenOn: within(b.budsSeenOn), firstOpenOn: within(b.firstOpenOn), lastFadedOn: within(b.lastFadedOn) };
    // Flowers are counted once open; a count from after the division date stays behind.
    if (!trimmed.firstOpenOn && b.firstOpenOn) trimmed.flowerCount = null;
    const hadDates = b.budsSeenOn || b.firstOpenOn || b.lastFadedOn;
    if (hadDates && !trimmed.budsSeenOn && !trimmed.firstOpenOn && !trimmed.lastFadedOn) continue;
    keptBlooms.push(trimmed);
  }
  const keptLeadIds = new Set(leadIds);
  const keptPhotos = allPhotos.filter((p) => {
    if (p.plantId === division.id) return true;
    const limit = cutoffOf.get(p.plantId);
    if (!limit || p.takenOn > limit) return false;
    if (p.leadId && !keptLeadIds.has(p.leadId)) return false;
    return !p.measurementId || measurementIds.has(p.measurementId);
  });

  return { division, ancestors, leads: keptLeads, measurements: keptMeasurements, blooms: keptBlooms, photos: keptPhotos, historyLeadIds };
}

function countsOf(l: Lineage): HandoffContents {
  const history = (leadId: string) => l.historyLeadIds.has(leadId);
  return {
    historyPlants: l.ancestors.length,
    historyLeads: l.historyLeadIds.size,
    historyMeasurements: l.measurements.filter((m) => history(m.leadId)).length,
    historyBlooms: l.blooms.filter((b) => history(b.leadId)).length,
    ownLeads: l.leads.length - l.historyLeadIds.size,
    ownMeasurements: l.measurements.filter((m) => !history(m.leadId)).length,
    ownBlooms: l.blooms.filter((b) => !history(b.leadId)).length,
    photos: l.photos.length,
  };
}

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** "the parent's history (4 leads, 31 measurements, 2 bloom records), its own …" for the mail. */
function historyWords(c: HandoffContents): string {
  const own = `its own ${plural(c.ownLeads, 'lead', 'leads')} and ${plural(c.ownMeasurements, 'measurement', 'measurements')}`;
  if (c.historyPlants === 0) return `${own}${c.photos ? ` and ${plural(c.photos, 'photo', 'photos')}` : ''}`;
  const from = c.historyPlants === 1 ? "the parent plant's" : `${c.historyPlants} ancestor plants'`;
  return `${from} history up to the division date (${plural(c.historyLeads, 'lead', 'leads')}, ${plural(c.historyMeasurements, 'measurement', 'measurements')}, ${plural(c.historyBlooms, 'bloom record', 'bloom records')}), ${own}, and ${plural(c.photos, 'photo', 'photos')}`;
}

// ── The link ─────────────────────────────────────────────────────────────────────────────

/** Why a token cannot be used, in words for the person holding the link; null when it can. */
function refusal(row: HandoffRow | undefined, now: Date): HttpError | null {
  if (!row) return new HttpError(404, 'handoff_unknown', 'This hand-off link is not known; ask the grower to send it again');
  if (row.acceptedAt) return new HttpError(410, 'handoff_used', 'This division has already been accepted; each link works once');
  if (row.revokedAt) return new HttpError(410, 'handoff_revoked', 'The grower withdrew this hand-off; ask them to send it again');
  if (row.expiresAt.getTime() <= now.getTime()) return new HttpError(410, 'handoff_expired', 'This hand-off link has expired; ask the grower to send it again');
  return null;
}

const givenAwayGone = (plant: PlantRow) =>
  new HttpError(410, 'handoff_given_away', `This plant has already been given to ${plant.givenTo ?? 'someone else'}; the link no longer works`);

export async function previewHandoff(db: Database, token: string, now = new Date()): Promise<HandoffPreview> {
  const [found] = await db
    .select({ handoff: divisionHandoffs, plant: plants, givenBy: users.displayName })
    .from(divisionHandoffs)
    .innerJoin(plants, eq(plants.id, divisionHandoffs.plantId))
    .leftJoin(users, eq(users.id, divisionHandoffs.sentBy))
    .where(eq(divisionHandoffs.tokenHash, hashToken(token)))
    .limit(1);
  // A link withdrawn because the plant went to someone else says so.
  if (found && !found.handoff.acceptedAt && found.plant.givenAwayOn) throw givenAwayGone(found.plant);
  const refused = refusal(found?.handoff, now);
  if (refused) throw refused;
  const { handoff, plant, givenBy } = found!;
  const contents = countsOf(await gatherLineage(db, handoff.collectionId, plant));
  return {
    plantName: plantDisplayName(plant),
    plantTag: plant.tag,
    givenBy,
    recipientEmail: handoff.recipientEmail,
    note: handoff.note,
    dividedOn: plant.dividedOn,
    expiresAt: handoff.expiresAt.toISOString(),
    contents,
  };
}

/** `base`, or `base-2`, `base-3` … : the first that no plant of the collection carries. */
function freeTag(base: string, taken: Set<string>): string {
  let tag = base;
  for (let n = 2; taken.has(tag); n += 1) tag = `${base}-${n}`;
  taken.add(tag);
  return tag;
}

async function insertChunked<T>(rows: T[], insert: (chunk: T[]) => Promise<unknown>): Promise<void> {
  for (let i = 0; i < rows.length; i += INSERT_CHUNK) await insert(rows.slice(i, i + INSERT_CHUNK));
}

/**
 * Accepts a hand-off for the signed-in recipient, in one transaction holding the hand-off and
 * the giver's plant: the lineage ancestors become read-only history plants in the chosen
 * collection, the division is copied with all its records, photos are copied in the photo
 * store (removed again if the transaction fails), and the giver's plant notes where it went.
 */
export async function acceptHandoff(
  db: Database,
  store: PhotoStore,
  token: string,
  user: { id: string; email: string; displayName: string },
  input: AcceptHandoffInput,
  now = new Date(),
): Promise<AcceptedHandoff & { giverCollectionId: string }> {
  const copiedKeys: string[] = [];
  try {
    return await db.transaction(async (tx) => {
      const [row] = await tx.select().from(divisionHandoffs).where(eq(divisionHandoffs.tokenHash, hashToken(token))).for('update');
      const [plant] = row ? await tx.select().from(plants).where(eq(plants.id, row.plantId)).for('update') : [];
      if (row && !row.acceptedAt && plant?.givenAwayOn) throw givenAwayGone(plant);
      const refused = refusal(row, now);
      if (refused) throw refused;
      if (row.recipientEmail !== user.email.trim().toLowerCase()) {
        throw new HttpError(
          403,
          'handoff_other_recipient',
          'This division was handed to another e-mail address; only that person can accept it. Sign in with the address the mail went to.',
        );
      }
      if (!plant) throw new HttpError(410, 'handoff_plant_gone', 'The plant of this hand-off no longer exists');
      if (plant.historyOnly) throw readOnlyCopy();

      let collectionId: string;
      if (input.collectionId) {
        const [membership] = await tx
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.collectionId, input.collectionId), eq(memberships.userId, user.id)))
          .limit(1);
        if (!membership) throw fieldError('collectionId', 'Choose one of your own collections');
        if (membership.role === 'viewer') {
          throw new HttpError(403, 'forbidden', 'You are a viewer of that collection; choose one where you are an owner or grower, or make a new one');
        }
        if (input.collectionId === row.collectionId) throw fieldError('collectionId', 'The plant is already in this collection; choose another one');
        collectionId = input.collectionId;
      } else {
        collectionId = await createCollectionFor(tx, user.id, { name: input.newCollectionName! });
      }

      const lineage = await gatherLineage(tx, row.collectionId, plant);
      const [sender] = row.sentBy
        ? await tx.select({ displayName: users.displayName }).from(users).where(eq(users.id, row.sentBy)).limit(1)
        : [];
      const giver = sender?.displayName ?? 'another grower';
      const today = todayOf(now);
      const taken = new Set(
        (await tx.select({ tag: plants.tag }).from(plants).where(eq(plants.collectionId, collectionId))).map((p) => p.tag),
      );

      // Farthest ancestor first, so each copy's parent exists when it is written.
      const plantIdMap = new Map<string, string>();
      const copyOf = (p: PlantRow, extra: Partial<typeof plants.$inferInsert> & { tag: string }) => ({
        id: randomUUID(),
        collectionId,
        genus: p.genus,
        epithet: p.epithet,
        isSpecies: p.isSpecies,
        clonalName: p.clonalName,
        source: p.source,
        medium: p.medium,
        parentPlantId: p.parentPlantId ? (plantIdMap.get(p.parentPlantId) ?? null) : null,
        dividedOn: p.dividedOn,
        receivedFrom: giver,
        ...extra,
      });
      for (const { plant: ancestor } of [...lineage.ancestors].reverse()) {
        const values = copyOf(ancestor, { tag: freeTag(`${ancestor.tag}-history`, taken), historyOnly: true, acquiredOn: ancestor.acquiredOn });
        await tx.insert(plants).values(values);
        plantIdMap.set(ancestor.id, values.id);
      }
      const tagClashes = taken.has(plant.tag);
      const divisionValues = copyOf(plant, {
        tag: freeTag(plant.tag, taken),
        acquiredOn: today,
        notes: row.note,
        createdBy: user.id,
      });
      const [copied] = await tx.insert(plants).values(divisionValues).returning();
      plantIdMap.set(plant.id, copied.id);

      const leadIdMap = new Map(lineage.leads.map((l) => [l.id, randomUUID()]));
      await insertChunked(lineage.leads, (chunk) =>
        tx.insert(leads).values(
          chunk.map((l) => ({
            id: leadIdMap.get(l.id)!,
            collectionId,
            plantId: plantIdMap.get(l.plantId)!,
            season: l.season,
            label: l.label,
            firstSeen: l.firstSeen,
            parentLeadId: l.parentLeadId ? (leadIdMap.get(l.parentLeadId) ?? null) : null,
            status: l.status,
            fromBackBulb: l.fromBackBulb,
          })),
        ),
      );
      const measurementIdMap = new Map(lineage.measurements.map((m) => [m.id, randomUUID()]));
      await insertChunked(lineage.measurements, (chunk) =>
        tx.insert(measurements).values(
          chunk.map((m) => ({
            id: measurementIdMap.get(m.id)!,
            collectionId,
            leadId: leadIdMap.get(m.leadId)!,
            measuredOn: m.measuredOn,
            heightMm: m.heightMm,
            leafCount: m.leafCount,
            sheath: m.sheath,
            rootTips: m.rootTips,
            bulbWidthMm: m.bulbWidthMm,
            note: m.note,
          })),
        ),
      );
      await insertChunked(lineage.blooms, (chunk) =>
        tx.insert(bloomRecords).values(
          chunk.map((b) => ({
            collectionId,
            leadId: leadIdMap.get(b.leadId)!,
            budsSeenOn: b.budsSeenOn,
            firstOpenOn: b.firstOpenOn,
            lastFadedOn: b.lastFadedOn,
            flowerCount: b.flowerCount,
            spikeCount: b.spikeCount,
            note: b.note,
          })),
        ),
      );

      // Photo files are copied before the rows commit; the catch below removes them on failure.
      const photoRows: Array<typeof photos.$inferInsert> = [];
      for (const p of lineage.photos) {
        const id = randomUUID();
        const storageKey = `${collectionId}/${id}`;
        const display = await store.get(photoKey(p.storageKey, 'display'));
        const thumb = await store.get(photoKey(p.storageKey, 'thumb'));
        if (!display || !thumb) continue; // a file already missing from the store stays missing
        for (const [size, data] of [['display', display], ['thumb', thumb]] as const) {
          const key = photoKey(storageKey, size);
          copiedKeys.push(key);
          await store.put(key, data, 'image/webp');
        }
        photoRows.push({
          id,
          collectionId,
          plantId: plantIdMap.get(p.plantId)!,
          leadId: p.leadId ? (leadIdMap.get(p.leadId) ?? null) : null,
          measurementId: p.measurementId ? (measurementIdMap.get(p.measurementId) ?? null) : null,
          takenOn: p.takenOn,
          storageKey,
          width: p.width,
          height: p.height,
          thumbWidth: p.thumbWidth,
          thumbHeight: p.thumbHeight,
          bytes: p.bytes,
          caption: p.caption,
        });
      }
      await insertChunked(photoRows, (chunk) => tx.insert(photos).values(chunk));

      const [recipient] = await tx.select({ displayName: users.displayName }).from(users).where(eq(users.id, user.id)).limit(1);
      await tx
        .update(plants)
        .set({
          givenAwayOn: today,
          givenTo: `${recipient?.displayName ?? user.displayName} (${row.recipientEmail})`,
          version: plant.version + 1,
          updatedAt: now,
        })
        .where(eq(plants.id, plant.id));
      await tx
        .update(divisionHandoffs)
        .set({ acceptedAt: now, acceptedBy: user.id, acceptedCollectionId: collectionId, acceptedPlantId: copied.id })
        .where(eq(divisionHandoffs.id, row.id));
      // Any other pending link for the same plant can no longer be honoured.
      await tx
        .update(divisionHandoffs)
        .set({ revokedAt: now })
        .where(
          and(
            eq(divisionHandoffs.plantId, plant.id),
            ne(divisionHandoffs.id, row.id),
            isNull(divisionHandoffs.acceptedAt),
            isNull(divisionHandoffs.revokedAt),
          ),
        );

      const contents = countsOf(lineage);
      return {
        collectionId,
        plantId: copied.id,
        tag: copied.tag,
        tagChangedFrom: tagClashes ? plant.tag : null,
        contents: { ...contents, photos: photoRows.length },
        giverCollectionId: row.collectionId,
      };
    });
  } catch (error) {
    if (copiedKeys.length > 0) await store.delete(copiedKeys).catch(() => {});
    throw error;
  }
}
