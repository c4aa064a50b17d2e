import { randomBytes } from 'node:crypto';
import { and, asc, eq, sql } from 'drizzle-orm';
import type { Logger } from 'pino';
import { formatDate } from '@/domain/words';
import type { AttentionListResponse } from '@/shared/schemas/engine';
import type { Database } from '../../db/client';
import { collections, digestRuns, digestSubscriptions, memberships, users } from '../../db/schema';
import { escapeHtml, type Mailer } from '../mail/mailer';
import { attentionItems, todayUtc } from '../routes/engine';
import { loadCollectionEngineData } from '../services/engine-data';
import type { ColdNights } from '@/shared/schemas/cold-nights';
import type { WeatherClient } from '../weather/client';
import { bringInLine, coldNightsFor, formatC } from './cold-nights';

type DigestItem = AttentionListResponse['items'][number];

/** The kinds the digest carries: flags, sheaths and bloom windows; "due for measuring" stays on Today. */
export const DIGEST_KINDS: ReadonlySet<DigestItem['kind']> = new Set(['aborted', 'stalled', 'sheath', 'bloom']);

const SECTION_TITLES: Record<string, string> = {
  aborted: 'Aborted leads',
  stalled: 'Stalled leads',
  sheath: 'Sheaths to check',
  bloom: 'Bloom windows opening in the next fortnight',
};

/** The ISO 8601 week of `now` in UTC, such as "2026-W49": one digest per week. */
export function digestPeriod(now: Date): string {
  const day = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
  const weekday = day.getUTCDay() || 7;
  day.setUTCDate(day.getUTCDate() + 4 - weekday);
  const yearStart = Date.UTC(day.getUTCFullYear(), 0, 1);
  const week = Math.ceil(((day.getTime() - yearStart) / 86_400_000 + 1) / 7);
  return `${day.getUTCFullYear()}-W${String(week).padStart(2, '0')}`;
}

/** The digest's items for a collection on `today`: the attention route's own list, digest kinds only. */
export async function digestItems(db: Database, collectionId: string, today: string): Promise<DigestItem[]> {
  const data = await loadCollectionEngineData(db, collectionId);
  return attentionItems(data, today).filter((item) => DIGEST_KINDS.has(item.kind));
}

/** The member's unsubscribe key, creating the subscription row on first use. */
export async function subscriptionFor(db: Database, collectionId: string, userId: string): Promise<{ optedOut: boolean; unsubscribeKey: string }> {
  await db
    .insert(digestSubscriptions)
    .values({ collectionId, userId, unsubscribeKey: randomBytes(24).toString('base64url') })
    .onConflictDoNothing();
  const [row] = await db
    .select({ optedOut: digestSubscriptions.optedOut, unsubscribeKey: digestSubscriptions.unsubscribeKey })
    .from(digestSubscriptions)
    .where(and(eq(digestSubscriptions.collectionId, collectionId), eq(digestSubscriptions.userId, userId)));
  return row;
}

export async function setDigestOptOut(db: Database, collectionId: string, userId: string, optedOut: boolean): Promise<void> {
  await subscriptionFor(db, collectionId, userId);
  await db
    .update(digestSubscriptions)
    .set({ optedOut, updatedAt: new Date() })
    .where(and(eq(digestSubscriptions.collectionId, collectionId), eq(digestSubscriptions.userId, userId)));
}

/** Switches the digest off for the subscription the key belongs to; false for an unknown key. */
export async function unsubscribeByKey(db: Database, key: string): Promise<{ collectionName: string } | null> {
  const [row] = await db
    .update(digestSubscriptions)
    .set({ optedOut: true, updatedAt: new Date() })
    .where(eq(digestSubscriptions.unsubscribeKey, key))
    .returning({ collectionId: digestSubscriptions.collectionId });
  if (!row) return null;
  const [collection] = await db.select({ name: collections.name }).from(collections).where(eq(collections.id, row.collectionId));
  return { collectionName: collection?.name ?? 'your collection' };
}

export async function collectionNameForKey(db: Database, key: string): Promise<string | null> {
  const [row] = await db
    .select({ name: collections.name })
    .from(digestSubscriptions)
    .innerJoin(collections, eq(collections.id, digestSubscriptions.collectionId))
    .where(eq(digestSubscriptions.unsubscribeKey, key));
  return row?.name ?? null;
}

/** One item in the app's own words: the lead's story (as on Today), dates as the app writes them. */
function describe(item: DigestItem): string {
  const since = (item.kind === 'stalled' || item.kind === 'aborted') && item.date ? ` (since ${formatDate(item.date)})` : '';
  return `${item.plantTag}, lead ${item.leadLabel} (${item.story.chip.label}): ${item.reason}${since}`;
}

const nightLabel = (cold: Extract<ColdNights, { status: 'ok' }>, date: string) => `${date === cold.nights[0]?.date ? 'Tonight' : 'Night of'} ${date}`;

/** The digest's cold-night section as text lines: each night ahead with plants to bring in, or why the forecast is missing. */
export function coldNightLines(cold: ColdNights | null | undefined): string[] {
  if (!cold || cold.status === 'no_location') return [];
  if (cold.status === 'unavailable') return ['', 'Cold nights:', `- Night forecast unavailable: ${cold.reason}.`];
  const nights = cold.nights.filter((n) => n.plants.length > 0);
  if (nights.length === 0) return [];
  return [
    '',
    'Cold nights: plants to bring in:',
    ...nights.flatMap((n) => [`- ${nightLabel(cold, n.date)}, forecast low ${formatC(n.lowC)}:`, ...n.plants.map((p) => `    - ${bringInLine(p)}`)]),
  ];
}

function coldNightHtml(cold: ColdNights | null | undefined): string {
  if (!cold || cold.status === 'no_location') return '';
  if (cold.status === 'unavailable') return `<h3>Cold nights</h3>\n<p>Night forecast unavailable: ${escapeHtml(cold.reason)}.</p>\n`;
  const nights = cold.nights.filter((n) => n.plants.length > 0);
  if (nights.length === 0) return '';
  return `<h3>Cold nights: plants to bring in</h3>\n<ul>\n${nights
    .map((n) => `<li>${escapeHtml(`${nightLabel(cold, n.date)}, forecast low ${formatC(n.lowC)}:`)}\n<ul>${n.plants.map((p) => `<li>${escapeHtml(bringInLine(p))}</li>`).join('')}</ul></li>`)
    .join('\n')}\n</ul>\n`;
}

/** Whether the cold-night section alone is worth a digest (plants to bring in on some night ahead). */
const hasBringIn = (cold: ColdNights | null | undefined) => cold?.status === 'ok' && cold.nights.some((n) => n.plants.length > 0);

export function digestMail(input: { collectionName: string; displayName: string; items: DigestItem[]; appUrl: string; unsubscribeUrl: string; today: string; coldNights?: ColdNights | null }) {
  const kinds = [...DIGEST_KINDS].filter((kind) => input.items.some((i) => i.kind === kind));
  const text = [
    `Hello ${input.displayName},`,
    '',
    `This week in ${input.collectionName} (as of ${formatDate(input.today)}), ${input.items.length} lead${input.items.length === 1 ? '' : 's'} need a look${input.items.length === 0 ? '' : ':'}`,
    ...coldNightLines(input.coldNights),
    ...kinds.flatMap((kind) => ['', `${SECTION_TITLES[kind]}:`, ...input.items.filter((i) => i.kind === kind).map((i) => `- ${describe(i)}`)]),
    '',
    `Open Sympodia: ${input.appUrl}`,
    '',
    `Stop these weekly mails for this collection: ${input.unsubscribeUrl}`,
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(input.displayName)},</p>
<p>This week in <strong>${escapeHtml(input.collectionName)}</strong> (as of ${escapeHtml(formatDate(input.today))}), ${input.items.length} lead${input.items.length === 1 ? '' : 's'} need a look${input.items.length === 0 ? '' : ':'}</p>
${coldNightHtml(input.coldNights)}
${kinds
  .map(
    (kind) =>
      `<h3>${escapeHtml(SECTION_TITLES[kind])}</h3>\n<ul>\n${input.items
        .filter((i) => i.kind === kind)
        .map((i) => `<li>${escapeHtml(describe(i))}</li>`)
        .join('\n')}\n</ul>`,
  )
  .join('\n')}
<p><a href="${escapeHtml(input.appUrl)}">Open Sympodia</a></p>
<p><a href="${escapeHtml(input.unsubscribeUrl)}">Stop these weekly mails for this collection</a></p>`;
  const subject =
    input.items.length === 0 && hasBringIn(input.coldNights)
      ? `Sympodia: cold nights ahead for ${input.collectionName}`
      : `Sympodia: ${input.items.length} lead${input.items.length === 1 ? '' : 's'} to look at in ${input.collectionName}`;
  return { subject, text, html };
}

export interface DigestContext {
  db: Database;
  mailer: Mailer;
  logger?: Logger;
  /** Night forecasts for the cold-night section; without one the digest has none. */
  weather?: WeatherClient;
}

/**
 * Sends this period's digest once across every server process: the process whose insert into
 * digest_runs succeeds sends it; the others find the period taken and send nothing. Members who
 * opted out, and collections with nothing to look at, get no mail.
 */
export async function runDigest(ctx: DigestContext, options: { now?: Date; runner?: string } = {}): Promise<{ period: string; claimed: boolean; sent: number }> {
  const now = options.now ?? new Date();
  const period = digestPeriod(now);
  const runner = options.runner ?? `pid-${process.pid}`;
  const claimed = await ctx.db.insert(digestRuns).values({ period, claimedBy: runner }).onConflictDoNothing().returning({ period: digestRuns.period });
  if (claimed.length === 0) return { period, claimed: false, sent: 0 };

  const today = todayUtc(now);
  let sent = 0;
  const all = await ctx.db.select({ id: collections.id, name: collections.name }).from(collections).orderBy(asc(collections.createdAt));
  for (const collection of all) {
    try {
      const members = await ctx.db
        .select({ userId: users.id, email: users.email, displayName: users.displayName, optedOut: sql<boolean | null>`${digestSubscriptions.optedOut}` })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .leftJoin(digestSubscriptions, and(eq(digestSubscriptions.collectionId, memberships.collectionId), eq(digestSubscriptions.userId, memberships.userId)))
        .where(eq(memberships.collectionId, collection.id));
      const wanting = members.filter((m) => m.optedOut !== true);
      if (wanting.length === 0) continue;
      const items = await digestItems(ctx.db, collection.id, today);
      const coldNights = ctx.weather ? await coldNightsFor(ctx.db, ctx.weather, collection.id) : null;
      if (items.length === 0 && !hasBringIn(coldNights)) continue;
      for (const member of wanting) {
        const { optedOut, unsubscribeKey } = await subscriptionFor(ctx.db, collection.id, member.userId);
        if (optedOut) continue;
        const unsubscribeUrl = `${ctx.mailer.publicUrl}/digest/unsubscribe/${unsubscribeKey}`;
        const mail = digestMail({ collectionName: collection.name, displayName: member.displayName, items, appUrl: `${ctx.mailer.publicUrl}/`, unsubscribeUrl, today, coldNights });
        await ctx.mailer.send({
          to: member.email,
          ...mail,
          headers: { 'List-Unsubscribe': `<${unsubscribeUrl}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' },
        });
        sent += 1;
      }
    } catch (error) {
      ctx.logger?.error({ err: error, collectionId: collection.id }, 'weekly digest failed for a collection');
    }
  }
  await ctx.db.update(digestRuns).set({ finishedAt: new Date(), sent }).where(eq(digestRuns.period, period));
  return { period, claimed: true, sent };
}

/** How often each server process checks whether this week's digest is still to be sent. */
export const DIGEST_CHECK_INTERVAL_MS = 60 * 60 * 1000;

/** The first check after a process starts (DIGEST_FIRST_CHECK_SECONDS overrides it). */
export const DIGEST_FIRST_CHECK_MS = 30_000;

/** Checks hourly (and once shortly after start); the first process to claim a new week sends it. */
export function startDigestScheduler(ctx: DigestContext, intervalMs = DIGEST_CHECK_INTERVAL_MS, firstCheckMs = DIGEST_FIRST_CHECK_MS): () => void {
  const tick = () => {
    runDigest(ctx)
      .then((result) => {
        if (result.claimed) ctx.logger?.info(result, 'weekly digest sent');
        else ctx.logger?.info({ period: result.period }, 'weekly digest already claimed by another run');
      })
      .catch((error: unknown) => ctx.logger?.error({ err: error }, 'weekly digest run failed'));
  };
  const first = setTimeout(tick, firstCheckMs);
  const timer = setInterval(tick, intervalMs);
  // The checks must not keep a stopping process alive.
  for (const handle of [first, timer]) (handle as unknown as { unref?: () => void }).unref?.();
  return () => {
    clearTimeout(first);
    clearInterval(timer);
  };
}
