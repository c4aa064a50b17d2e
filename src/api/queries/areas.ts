import { useMutation, useQueryClient } from '@tanstack/react-query';
import { areaSchema } from '@/shared/schemas/records';
import { request } from '../client';
import { recordKeys } from './records';

export interface AreaChanges {
  name?: string;
  indoors?: boolean;
  notes?: string | null;
}

/** Area writes change plant lists, Rounds and the cold-night check: refresh everything under the records key. */
function useInvalidate(collectionId: string) {
  const client = useQueryClient();
  return () => client.invalidateQueries({ queryKey: recordKeys.all(collectionId) });
}

export function useCreateAreaMutation(collectionId: string) {
  const invalidate = useInvalidate(collectionId);
  return useMutation({
    mutationFn: (input: { name: string; indoors: boolean }) => request(`/collections/${collectionId}/areas`, { method: 'POST', body: input, schema: areaSchema }),
    onSuccess: invalidate,
  });
}

export function useUpdateAreaMutation(collectionId: string) {
  const invalidate = useInvalidate(collectionId);
  return useMutation({
    mutationFn: ({ areaId, ...input }: AreaChanges & { areaId: string; version: number }) =>
      request(`/collections/${collectionId}/areas/${areaId}`, { method: 'PATCH', body: input, schema: areaSchema }),
    onSettled: invalidate,
  });
}
