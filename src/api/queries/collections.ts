import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { Role } from '@/shared/schemas/auth';
import { collectionSchema, memberSchema, type UpdateCollectionInput } from '@/shared/schemas/collections';
import { request } from '../client';
import { fromPageOrServer } from '../page-data';
import { sessionKeys } from './session';

export const collectionKeys = {
  all: ['collections'] as const,
  detail: (id: string) => ['collections', id] as const,
  members: (id: string) => ['collections', id, 'members'] as const,
};

export function useCollectionQuery(id: string | undefined) {
  return useQuery({
    queryKey: collectionKeys.detail(id ?? 'none'),
    ...fromPageOrServer(`/collections/${id}`, collectionSchema),
    enabled: !!id,
  });
}

export function useUpdateCollectionMutation(id: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateCollectionInput) =>
      request(`/collections/${id}`, { method: 'PATCH', body: input, schema: collectionSchema }),
    onSuccess: (collection) => {
      client.setQueryData(collectionKeys.detail(id), collection);
      client.invalidateQueries({ queryKey: sessionKeys.me });
    },
  });
}

export function useMembersQuery(id: string | undefined) {
  return useQuery({
    queryKey: collectionKeys.members(id ?? 'none'),
    queryFn: () => request(`/collections/${id}/members`, { schema: z.array(memberSchema) }),
    enabled: !!id,
  });
}

export function useChangeMemberRoleMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) =>
      request(`/collections/${collectionId}/members/${encodeURIComponent(userId)}`, {
        method: 'PATCH',
        body: { role },
        schema: z.array(memberSchema),
      }),
    onSuccess: (members) => {
      client.setQueryData(collectionKeys.members(collectionId), members);
      client.invalidateQueries({ queryKey: sessionKeys.me });
    },
  });
}

export function useRemoveMemberMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) =>
      request(`/collections/${collectionId}/members/${encodeURIComponent(userId)}`, { method: 'DELETE' }),
    onSuccess: () => client.invalidateQueries({ queryKey: collectionKeys.members(collectionId) }),
  });
}
