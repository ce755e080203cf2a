/**
 * Auth mutations (react-query) over the API: sign in/up/out, accept an invitation, and the two
 * password-reset steps. Every success that returns a Session is handed to the session store; the
 * route guards then move the user to the right home.
 */
import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';

import {
  invitationPreviewSchema,
  sessionSchema,
  type InvitationAcceptInput,
  type SignInInput,
  type SignUpInput,
} from '../shared/schemas';
import { apiRequest, apiRequestParsed, SIGN_OUT_PATH } from './api';
import { releaseDevice } from './device-owner';
import { useSession } from './session';

export const authKeys = {
  all: ['auth'] as const,
  invitation: (token: string) => [...authKeys.all, 'invitation', token] as const,
};

export function invitationPreviewQuery(token: string) {
  return queryOptions({
    queryKey: authKeys.invitation(token),
    queryFn: ({ signal }) =>
      apiRequestParsed(`/api/invitations/${encodeURIComponent(token)}`, invitationPreviewSchema, { signal }),
    // An invitation link either works or it does not; retrying a 404 only delays the message.
    retry: false,
    enabled: token.length > 0,
  });
}

function useSessionMutation<TInput>(path: string) {
  const setSession = useSession((s) => s.setSession);
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: TInput) =>
      apiRequestParsed(path, sessionSchema, { method: 'POST', body: input, skipRefresh: true }),
    onSuccess: (session) => {
      // A different person may have been signed in on this device: drop their cached team data.
      queryClient.clear();
      setSession(session);
    },
  });
}

export const useSignIn = () => useSessionMutation<SignInInput>('/api/auth/sign-in');
export const useSignUp = () => useSessionMutation<SignUpInput>('/api/auth/sign-up');
export const useAcceptInvite = () => useSessionMutation<InvitationAcceptInput>('/api/invitations/accept');
export const useConfirmPasswordReset = () =>
  useSessionMutation<{ token: string; password: string }>('/api/auth/password-reset/confirm');

export function useRequestPasswordReset() {
  return useMutation({
    mutationFn: (input: { email: string }) =>
      apiRequest<{ ok: true }>('/api/auth/password-reset', { method: 'POST', body: input, skipRefresh: true }),
  });
}

export function useSignOut() {
  const signOutLocally = useSession((s) => s.signOutLocally);
  const queryClient = useQueryClient();
  return useMutation({
    // The device signs out at once, whatever the server does: the person asked to leave, maybe
    // handing the phone over. The sign-out is written down before its request leaves (store/api.ts)
    // and sent again until the server has it, so nothing here waits for the answer. The rows
    // they could read leave the device first; their unsent changes stay, parked for them.
    mutationFn: async () => {
      void apiRequest<void>(SIGN_OUT_PATH, { method: 'POST', skipRefresh: true }).catch(() => undefined);
      await releaseDevice();
      queryClient.clear();
      signOutLocally();
    },
  });
}
