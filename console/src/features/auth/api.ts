import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, rememberCsrfToken, unwrap, type Schemas } from '@/lib/api-client';
import { sessionQueryKey } from '@/lib/session';

export type SignInInput = Schemas['SignInRequest'];

export function signIn(input: SignInInput) {
  return unwrap(api.POST('/v1/auth/sign-in', { body: input }));
}

export function requestPasswordReset(input: { email: string }) {
  return unwrap(api.POST('/v1/auth/password-reset', { body: input }));
}

export function completePasswordReset(input: { token: string; password: string }) {
  return unwrap(api.POST('/v1/auth/password-reset/complete', { body: input }));
}

export function acceptInvitation(input: { token: string; name: string; password: string }) {
  return unwrap(api.POST('/v1/auth/invitations/accept', { body: input }));
}

export function changePassword(input: { currentPassword: string; newPassword: string }) {
  return unwrap(api.POST('/v1/auth/password', { body: input }));
}

/** Every sign-in route answers with the new session: store it, so the shell opens without a second request. */
function useStoreSession() {
  const queryClient = useQueryClient();
  return (session: Schemas['SessionInfo']) => {
    rememberCsrfToken(session.csrfToken);
    queryClient.setQueryData(sessionQueryKey, session);
  };
}

export function useSignIn() {
  const store = useStoreSession();
  return useMutation({ mutationFn: signIn, onSuccess: store });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}

export function useCompletePasswordReset() {
  return useMutation({ mutationFn: completePasswordReset });
}

export function useAcceptInvitation() {
  const store = useStoreSession();
  return useMutation({ mutationFn: acceptInvitation, onSuccess: store });
}

export function useChangePassword() {
  const store = useStoreSession();
  return useMutation({ mutationFn: changePassword, onSuccess: store });
}
