import { useQuery } from '@tanstack/react-query';
import { coldNightsSchema } from '@/shared/schemas/cold-nights';
import { request } from '../client';
import { fromPageOrServer } from '../page-data';
import { recordKeys } from './records';

/** Under the records key: moving a plant, marking an area indoors or a new limit refreshes it. */
export const coldNightKeys = {
  forCollection: (c: string) => [...recordKeys.all(c), 'cold-nights'] as const,
};

/** The server keeps the forecast for ten minutes; asking more often than this gains nothing. */
const COLD_NIGHTS_STALE_MS = 5 * 60 * 1000;

/** Tonight and the next three nights with the plants to bring in; its own query so a slow forecast never holds Today. */
export function useColdNightsQuery(collectionId: string) {
  return useQuery({
    queryKey: coldNightKeys.forCollection(collectionId),
    ...fromPageOrServer(`/collections/${collectionId}/cold-nights`, coldNightsSchema),
    enabled: collectionId !== '',
    staleTime: COLD_NIGHTS_STALE_MS,
  });
}
