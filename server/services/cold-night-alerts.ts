import { Cron } from 'croner';
import { and, asc, eq, isNotNull, sql } from 'drizzle-orm';
import type { Logger } from 'pino';
import type { ColdNight } from '@/shared/schemas/cold-nights';
import type { Database } from '../../db/client';
import { coldNightAlerts, collections, digestSubscriptions, memberships, users } from '../../db/schema';
import { escapeHtml, type Mailer } from '../mail/mailer';
import type { WeatherClient } from '../weather/client';
import { bringInLine, coldNightsFor, formatC } from './cold-nights';
import { subscriptionFor } from './digest';

export interface ColdNightAlertContext {
  db: Database;
  mailer: Mailer;
  weather: WeatherClient;
  logger?: Logger;
}

export function coldNightMail(input: { collectionName: string; displayName: string; night: ColdNight; appUrl: string; unsubscribeUrl: string }) {
  const { night } = input;
  const count = night.plants.length;
  const plantsWord = `${count} plant${count === 1 ? '' : 's'}`;
  const byArea = new Map<string, ColdNight['plants']>();
  for (const p of night.plants) byArea.set(p.areaName, [...(byArea.get(p.areaName) ?? []), p]);
  const text = [
    `Hello ${input.displayName},`,
    '',
    `Tonight (${night.date}) the forecast low at ${input.collectionName} is ${formatC(night.lowC)}: bring in ${plantsWord} from outdoor areas.`,
    ...[...byArea].flatMap(([area, list]) => ['', `${area}:`, ...list.map((p) => `- ${bringInLine(p)}`)]),
    '',
    `Open Sympodia: ${input.appUrl}`,
    '',
    `Stop Sympodia's mail for this collection (this warning and the weekly digest): ${input.unsubscribeUrl}`,
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(input.displayName)},</p>
<p>Tonight (${escapeHtml(night.date)}) the forecast low at <strong>${escapeHtml(input.collectionName)}</strong> is <strong>${escapeHtml(formatC(night.lowC))}</strong>: bring in ${plantsWord} from outdoor areas.</p>
${[...byArea].map(([area, list]) => `<h3>${escapeHtml(area)}</h3>\n<ul>\n${list.map((p) => `<li>${escapeHtml(bringInLine(p))}</li>`).join('\n')}\n</ul>`).join('\n')}
<p><a href="${escapeHtml(input.appUrl)}">Open Sympodia</a></p>
<p><a href="${escapeHtml(input.unsubscribeUrl)}">Stop Sympodia's mail for this collection</a> (this warning and the weekly digest)</p>`;
  return { subject: `Sympodia: bring in ${plantsWord} tonight, low ${formatC(night.lowC)} at ${input.collectionName}`, text, html };
}

/**
 * The same-day warning: for each collection with a location whose forecast has a night below a
 * plant's limit tonight (its low falls within the next 24 hours), the process whose insert of
 * (collection, night) into cold_night_alerts succeeds mails the members who have not switched
 * the digest off; every other run finds the night taken and sends nothing. A forecast that
 * fails sends nothing (and claims nothing, so a later hour can still warn).
 */
export async function runColdNightAlerts(
  ctx: ColdNightAlertContext,
  options: { runner?: string } = {},
): Promise<{ checked: number; alerts: Array<{ collectionId: string; night: string; claimed: boolean; sent: number }> }> {
  const runner = options.runner ?? `pid-${process.pid}`;
  const located = await ctx.db
    .select({ id: collections.id, name: collections.name })
    .from(collections)
    .where(and(isNotNull(collections.latitude), isNotNull(collections.longitude)))
    .orderBy(asc(collections.createdAt));
  const alerts: Array<{ collectionId: string; night: string; claimed: boolean; sent: number }> = [];
  for (const collection of located) {
    try {
      const report = await coldNightsFor(ctx.db, ctx.weather, collection.id);
      if (report.status !== 'ok') continue;
      const tonight = report.nights[0];
      if (!tonight || tonight.plants.length === 0) continue;
      const claim = await ctx.db
        .insert(coldNightAlerts)
        .values({ collectionId: collection.id, night: tonight.date, claimedBy: runner })
        .onConflictDoNothing()
        .returning({ night: coldNightAlerts.night });
      if (claim.length === 0) {
        alerts.push({ collectionId: collection.id, night: tonight.date, claimed: false, sent: 0 });
        continue;
      }
      const members = await ctx.db
        .select({ userId: users.id, email: users.email, displayName: users.displayName, optedOut: sql<boolean | null>`${digestSubscriptions.optedOut}` })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .leftJoin(digestSubscriptions, and(eq(digestSubscriptions.collectionId, memberships.collectionId), eq(digestSubscriptions.userId, memberships.userId)))
        .where(eq(memberships.collectionId, collection.id));
      let sent = 0;
      for (const member of members.filter((m) => m.optedOut !== true)) {
        const { optedOut, unsubscribeKey } = await subscriptionFor(ctx.db, collection.id, member.userId);
        if (optedOut) continue;
        const unsubscribeUrl = `${ctx.mailer.publicUrl}/digest/unsubscribe/${unsubscribeKey}`;
        const mail = coldNightMail({ collectionName: collection.name, displayName: member.displayName, night: tonight, appUrl: `${ctx.mailer.publicUrl}/`, unsubscribeUrl });
        try {
          await ctx.mailer.send({
            to: member.email,
            ...mail,
            headers: { 'List-Unsubscribe': `<${unsubscribeUrl}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' },
          });
          sent += 1;
        } catch (error) {
          ctx.logger?.error({ err: error, collectionId: collection.id }, 'cold-night warning could not be mailed to a member');
        }
      }
      await ctx.db
        .update(coldNightAlerts)
        .set({ sent })
        .where(and(eq(coldNightAlerts.collectionId, collection.id), eq(coldNightAlerts.night, tonight.date)));
      alerts.push({ collectionId: collection.id, night: tonight.date, claimed: true, sent });
    } catch (error) {
      ctx.logger?.error({ err: error, collectionId: collection.id }, 'cold-night check failed for a collection');
    }
  }
  return { checked: located.length, alerts };
}

/** Minute 5 of every hour: a front that shows up in the afternoon forecast is still warned of in time. */
export const COLD_NIGHT_CHECK_PATTERN = '5 * * * *';

/** Checks hourly (and once shortly after start) in each server process; the claim makes one of them send. */
export function startColdNightScheduler(ctx: ColdNightAlertContext, pattern = COLD_NIGHT_CHECK_PATTERN): () => void {
  const tick = async () => {
    try {
      const result = await runColdNightAlerts(ctx);
      const sent = result.alerts.filter((a) => a.claimed);
      if (sent.length > 0) ctx.logger?.info({ alerts: sent }, 'cold-night warnings sent');
    } catch (error) {
      ctx.logger?.error({ err: error }, 'cold-night check failed');
    }
  };
  // protect: an hour's check still running (a slow forecast) is not started twice.
  const job = new Cron(pattern, { protect: true, unref: true }, tick);
  const first = setTimeout(() => void tick(), 45_000);
  (first as unknown as { unref?: () => void }).unref?.();
  return () => {
    clearTimeout(first);
    job.stop();
  };
}
