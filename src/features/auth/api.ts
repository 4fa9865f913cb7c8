import { queryOptions } from '@tanstack/react-query';
import type { PasswordResetRequest, SignInInput } from '../../../shared/schemas/auth';
import type { ChangePasswordInput, SetPasswordInput } from '../../../shared/schemas/password';
import { api, ApiError } from '../../lib/api-client';
import type { Me } from '../../../shared/schemas/auth';
export type { Me } from '../../../shared/schemas/auth';

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
};

export const signIn = (input: SignInInput) => api<{ user: Me['user'] }>('POST', '/api/auth/sign-in', input);
export const signOut = () => api<void>('POST', '/api/auth/sign-out');
export const requestPasswordReset = (input: PasswordResetRequest) => api<{ message: string }>('POST', '/api/auth/password-reset', input);
export const setPassword = (input: SetPasswordInput) => api<{ user: Me['user'] }>('POST', '/api/auth/set-password', input);
export const changePassword = (input: ChangePasswordInput) => api<void>('POST', '/api/auth/change-password', input);
