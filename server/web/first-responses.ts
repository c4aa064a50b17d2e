import { idSchema } from '@/shared/schemas/common';
import type { PageRoute } from './expo-routes';

/**
 * The API requests a screen makes first, by route file: the page server asks them itself, draws
 * the screen from the answers and writes them into the page. Each path must be exactly the one
 * the screen's query passes to `request` (see src/api/queries/ and src/api/page-data.ts): an
 * answer the page does not use is wasted, and e2e/first-screen.spec.ts fails when the browser
 * asks for one of them again.
 */
const FIRST_REQUESTS: Record<string, (collection: string, params: Record<string, string>) => string[]> = {
  // Today: useAttentionQuery and useColdNightsQuery.
  '(app)/(tabs)/index.tsx': (c) => [`/collections/${c}/attention`, `/collections/${c}/cold-nights`],
  // Lead: useCollectionQuery, useLeadQuery, useLeadForecastQuery.
  '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx': (c, { leadId }) => [
    `/collections/${c}`,
    `/collections/${c}/leads/${leadId}`,
    `/collections/${c}/leads/${leadId}/forecast`,
  ],
};

/**
 * The first API requests (paths under /api) of the screen at `route`, in `collectionId` (one of
 * the signed-in person's). Ids in the path that are not well formed get none: the screen will say so.
 */
export function firstRequests(route: PageRoute, collectionId: string): string[] {
  const requests = FIRST_REQUESTS[route.file];
  if (!requests) return [];
  if (!Object.values(route.params).every((value) => idSchema.safeParse(value).success)) return [];
  return requests(collectionId, route.params);
}
