import { idSchema } from '@/shared/schemas/common';
import type { RouteMatch } from './route-chunks';

/**
 * The API requests a screen makes first, by route file, so the page can start them while the
 * bundle downloads. Each URL must be exactly the one the screen's query asks for (see
 * src/api/queries/): a preload the page does not use is a wasted request, and
 * e2e/first-screen.spec.ts fails when one is fetched twice or not at all.
 */
const FIRST_REQUESTS: Record<string, (collection: string, params: Record<string, string>) => string[]> = {
  // Today: useAttentionQuery and useColdNightsQuery.
  '(app)/(tabs)/index.tsx': (c) => [`/api/collections/${c}/attention`, `/api/collections/${c}/cold-nights`],
  // Lead: useCollectionQuery, useLeadQuery, useLeadForecastQuery.
  '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx': (c, { leadId }) => [
    `/api/collections/${c}`,
    `/api/collections/${c}/leads/${leadId}`,
    `/api/collections/${c}/leads/${leadId}/forecast`,
  ],
};

/**
 * The first API requests of the screen at `route`, in `collectionId` (one of the signed-in
 * person's). Ids in the path that are not well formed get no preloads: the screen will say so.
 */
export function firstRequests(route: RouteMatch | null, collectionId: string): string[] {
  const requests = route && FIRST_REQUESTS[route.file];
  if (!requests) return [];
  if (!Object.values(route.params).every((value) => idSchema.safeParse(value).success)) return [];
  return requests(collectionId, route.params);
}
