import { QueryClient, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { meSchema, sessionSchema, signUpConfirmedSchema, signUpRequestedSchema, type Me, type SignInInput, type SignUpInput } from '@/shared/schemas/auth';
import { request } from '../client';
import { forgetPageAnswers, meFromPage } from '../page-data';

export const sessionKeys = { me: ['me'] as const };

/**
 * Switches the cache to another person (or to nobody): the session query keeps its
 * observers so guarded layouts redirect at once, and every other cached record goes.
 */
function switchPerson(client: QueryClient, me: Me | null) {
  forgetPageAnswers();
  client.setQueryData(sessionKeys.me, me);
  client.removeQueries({ predicate: (query) => query.queryKey[0] !== sessionKeys.me[0] });
}

/** The signed-in person and their collections; `null` when signed out. */
export function useMeQuery() {
  return useQuery({
    queryKey: sessionKeys.me,
    queryFn: async (): Promise<Me | null> => (await request('/session', { schema: sessionSchema })).me,
    initialData: meFromPage,
  });
}

export function useSignInMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) => request('/auth/sign-in', { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => switchPerson(client, me),
  });
}

/** Asks for an account: the server mails the address a link that creates it (the answer is the same for a taken address). */
export function useSignUpMutation() {
  return useMutation({
    mutationFn: (input: SignUpInput) => request('/auth/sign-up', { method: 'POST', body: input, schema: signUpRequestedSchema }),
  });
}

/** Follows a mailed sign-up link: the account is made and this browser signed in to it. */
export function useConfirmSignUpMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (token: string) => request('/auth/sign-up/confirm', { method: 'POST', body: { token }, schema: signUpConfirmedSchema }),
    onSuccess: ({ next: _next, ...me }) => switchPerson(client, me),
  });
}

export function useSignOutMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => request('/auth/sign-out', { method: 'POST' }),
    onSettled: () => switchPerson(client, null),
  });
}

/** Ends the account's sessions on every device, this one included. */
export function useSignOutEverywhereMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => request('/auth/sign-out-everywhere', { method: 'POST' }),
    onSuccess: () => switchPerson(client, null),
  });
}
