import { useMutation } from '@tanstack/react-query';
import { http } from '../api/http';
import type { SignInResult } from '../api/types';

export function useSignIn() {
  return useMutation({
    mutationFn: (body: { email: string; password: string }) => http.post<SignInResult>('/api/auth/sign-in', body, { token: null }),
  });
}

export function useRequestPasswordReset() {
  return useMutation({
    mutationFn: (body: { email: string }) => http.post<{ ok: true }>('/api/auth/password-reset', body, { token: null }),
  });
}

export function useConfirmPasswordReset() {
  return useMutation({
    mutationFn: (body: { token: string; password: string }) =>
      http.post<{ ok: true }>('/api/auth/password-reset/confirm', body, { token: null }),
  });
}
