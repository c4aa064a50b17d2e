import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import {
  acceptedHandoffSchema,
  handoffPreviewSchema,
  handoffSchema,
  type AcceptHandoffInput,
  type CreateHandoffInput,
} from '@/shared/schemas/handoffs';
import { ApiError, request } from '../client';
import { recordKeys } from './records';
import { sessionKeys } from './session';

export const handoffKeys = {
  ofCollection: (collectionId: string) => ['collections', collectionId, 'handoffs'] as const,
  ofPlant: (collectionId: string, plantId: string) => ['collections', collectionId, 'handoffs', plantId] as const,
  preview: (token: string) => ['handoff', token] as const,
};

/** Pending hand-offs of one plant (owners and growers only; the server refuses viewers). */
export function usePlantHandoffsQuery(collectionId: string, plantId: string, enabled = true) {
  return useQuery({
    queryKey: handoffKeys.ofPlant(collectionId, plantId),
    queryFn: () => request(`/collections/${collectionId}/plants/${plantId}/handoffs`, { schema: z.array(handoffSchema) }),
    enabled,
  });
}

export function useSendHandoffMutation(collectionId: string, plantId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateHandoffInput) =>
      request(`/collections/${collectionId}/plants/${plantId}/handoffs`, { method: 'POST', body: input, schema: handoffSchema }),
    onSuccess: () => client.invalidateQueries({ queryKey: handoffKeys.ofCollection(collectionId) }),
  });
}

export function useRevokeHandoffMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (handoffId: string) => request(`/collections/${collectionId}/handoffs/${handoffId}`, { method: 'DELETE' }),
    onSettled: () => client.invalidateQueries({ queryKey: handoffKeys.ofCollection(collectionId) }),
  });
}

/** What a hand-off link offers. A refused link (used, revoked, expired) is final: no retries. */
export function useHandoffPreviewQuery(token: string, enabled = true) {
  return useQuery({
    enabled,
    queryKey: handoffKeys.preview(token),
    queryFn: () => request(`/handoffs/${encodeURIComponent(token)}`, { schema: handoffPreviewSchema }),
    retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
  });
}

export function useAcceptHandoffMutation(token: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: AcceptHandoffInput) =>
      request(`/handoffs/${encodeURIComponent(token)}/accept`, { method: 'POST', body: input, schema: acceptedHandoffSchema }),
    onSuccess: (accepted) => {
      client.invalidateQueries({ queryKey: sessionKeys.me });
      client.invalidateQueries({ queryKey: recordKeys.all(accepted.collectionId) });
    },
  });
}
