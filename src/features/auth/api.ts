import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { PasswordResetRequest, SignInInput } from '../../../shared/schemas/auth';
import type { ChangePasswordInput, SetPasswordInput } from '../../../shared/schemas/password';
import { api, apiGet, ApiError } from '../../lib/api-client';
import type { Me, NotificationChoice, NotificationChoiceChange, ResetRequested, SignedIn } from '../../../shared/schemas/auth';
export type { Me, NotificationChoice, NotificationChoiceChange } from '../../../shared/schemas/auth';

/** The signed-in user, or null when nobody is signed in. */
export async function getMe(): Promise<Me | null> {
  try {
    return await api<Me>('GET', '/api/auth/me');
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    throw err;
  }
}

export const authQueries = {
  all: ['auth'] as const,
  me: () => queryOptions({ queryKey: [...authQueries.all, 'me'], queryFn: getMe, staleTime: 60_000 }),
  notifications: () => queryOptions({ queryKey: [...authQueries.all, 'notifications'], queryFn: getNotificationChoices }),
};

export const getNotificationChoices = () => apiGet<NotificationChoice[]>('/api/auth/notifications');
export const setNotificationChoice = (c: NotificationChoiceChange) => api<NotificationChoiceChange>('PUT', '/api/auth/notifications', c);

export const signIn = (input: SignInInput) => api<SignedIn>('POST', '/api/auth/sign-in', input);
export const signOut = () => api<void>('POST', '/api/auth/sign-out');
export const requestPasswordReset = (input: PasswordResetRequest) => api<ResetRequested>('POST', '/api/auth/password-reset', input);
export const setPassword = (input: SetPasswordInput) => api<SignedIn>('POST', '/api/auth/set-password', input);
export const changePassword = (input: ChangePasswordInput) => api<void>('POST', '/api/auth/change-password', input);

/** Signing in (or setting a password, which signs in) drops every cached answer about who is signed in. */
function useSignInMutation<TInput, TResult>(mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.removeQueries({ queryKey: authQueries.all }) });
}

export const useSignIn = () => useSignInMutation(signIn);
export const useSetPassword = () => useSignInMutation(setPassword);
export const useRequestPasswordReset = () => useMutation({ mutationFn: requestPasswordReset });
export const useChangePassword = () => useMutation({ mutationFn: changePassword });
export function useSetNotificationChoice() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setNotificationChoice,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: authQueries.notifications().queryKey }),
  });
}
