import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { meSchema } from '@/shared/schemas/auth';
import {
  acceptedInvitationSchema,
  digestSettingSchema,
  invitationPreviewSchema,
  invitationSchema,
  type CreateInvitationInput,
} from '@/shared/schemas/mail';
import { ApiError, request } from '../client';
import { sessionKeys } from './session';

export const mailKeys = {
  invitations: (collectionId: string) => ['collections', collectionId, 'invitations'] as const,
  invitation: (token: string) => ['invitation', token] as const,
  digest: (collectionId: string) => ['collections', collectionId, 'digest'] as const,
};

export function useInvitationsQuery(collectionId: string, enabled = true) {
  return useQuery({
    queryKey: mailKeys.invitations(collectionId),
    queryFn: () => request(`/collections/${collectionId}/invitations`, { schema: z.array(invitationSchema) }),
    enabled,
  });
}

export function useCreateInvitationMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateInvitationInput) =>
      request(`/collections/${collectionId}/invitations`, { method: 'POST', body: input, schema: invitationSchema }),
    onSuccess: () => client.invalidateQueries({ queryKey: mailKeys.invitations(collectionId) }),
  });
}

export function useRevokeInvitationMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => request(`/collections/${collectionId}/invitations/${invitationId}`, { method: 'DELETE' }),
    onSettled: () => client.invalidateQueries({ queryKey: mailKeys.invitations(collectionId) }),
  });
}

/** What an invitation link offers. A refused link (used, revoked, expired) is final: no retries. */
export function useInvitationPreviewQuery(token: string, enabled = true) {
  return useQuery({
    enabled,
    queryKey: mailKeys.invitation(token),
    queryFn: () => request(`/invitations/${encodeURIComponent(token)}`, { schema: invitationPreviewSchema }),
    retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
  });
}

export function useAcceptInvitationMutation(token: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => request(`/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST', schema: acceptedInvitationSchema }),
    onSuccess: () => client.invalidateQueries({ queryKey: sessionKeys.me }),
  });
}

export function useRequestPasswordResetMutation() {
  return useMutation({
    mutationFn: (email: string) => request('/auth/password-reset', { method: 'POST', body: { email } }),
  });
}

/** Sets the new password; the server ends every session of the account and signs this browser in. */
export function useCompletePasswordResetMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: { token: string; password: string }) =>
      request('/auth/password-reset/complete', { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => {
      client.setQueryData(sessionKeys.me, me);
      client.removeQueries({ predicate: (query) => query.queryKey[0] !== sessionKeys.me[0] });
    },
  });
}

export function useDigestSettingQuery(collectionId: string) {
  return useQuery({
    queryKey: mailKeys.digest(collectionId),
    queryFn: () => request(`/collections/${collectionId}/digest`, { schema: digestSettingSchema }),
  });
}

export function useDigestSettingMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (optedOut: boolean) => request(`/collections/${collectionId}/digest`, { method: 'PUT', body: { optedOut }, schema: digestSettingSchema }),
    onSuccess: (setting) => client.setQueryData(mailKeys.digest(collectionId), setting),
  });
}
