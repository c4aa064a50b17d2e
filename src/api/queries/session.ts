import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { meSchema, type Me, type SignInInput, type SignUpInput } from '@/shared/schemas/auth';
import { ApiError, request } from '../client';

export const sessionKeys = { me: ['me'] as const };

/** The signed-in person and their collections; `null` when signed out. */
export function useMeQuery() {
  return useQuery({
    queryKey: sessionKeys.me,
    queryFn: async (): Promise<Me | null> => {
      try {
        return await request('/me', { schema: meSchema });
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
  });
}

export function useSignInMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) => request('/auth/sign-in', { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => {
      client.clear();
      client.setQueryData(sessionKeys.me, me);
    },
  });
}

export function useSignUpMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: SignUpInput) => request('/auth/sign-up', { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => {
      client.clear();
      client.setQueryData(sessionKeys.me, me);
    },
  });
}

export function useSignOutMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => request('/auth/sign-out', { method: 'POST' }),
    onSettled: () => {
      client.clear();
      client.setQueryData(sessionKeys.me, null);
    },
  });
}
