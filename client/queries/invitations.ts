import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '../api/http';
import type { Invitation, InvitationPreview, Role, SignInResult } from '../api/types';

export const invitationsKeys = {
  all: ['invitations'] as const,
  list: () => [...invitationsKeys.all, 'list'] as const,
  preview: (token: string) => [...invitationsKeys.all, 'preview', token] as const,
};

/** Public look-up of an invitation link (no session needed). */
export function useInvitationPreview(token: string | undefined) {
  return useQuery({
    queryKey: invitationsKeys.preview(token ?? ''),
    queryFn: () => http.get<InvitationPreview>(`/api/invitations/${encodeURIComponent(token!)}`, undefined, { token: null }),
    enabled: !!token,
    retry: false,
  });
}

export function useAcceptInvitation() {
  return useMutation({
    mutationFn: (body: { token: string; name?: string; password: string }) =>
      http.post<SignInResult>('/api/invitations/accept', body, { token: null }),
  });
}

export function useInvitations(enabled = true) {
  return useQuery({
    queryKey: invitationsKeys.list(),
    queryFn: () => http.get<{ invitations: Invitation[] }>('/api/invitations').then((r) => r.invitations),
    enabled,
  });
}

export function useCreateInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; name: string; role: Role }) =>
      http.post<{ invitation: Invitation }>('/api/invitations', body).then((r) => r.invitation),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: invitationsKeys.all });
      // The invitation e-mail lands in the demo outbox.
      void qc.invalidateQueries({ queryKey: ['outbox'] });
    },
  });
}
