import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '../api/http';
import type { Role, User } from '../api/types';

export const usersKeys = {
  all: ['users'] as const,
  list: () => [...usersKeys.all, 'list'] as const,
};

export function useUsers(enabled = true) {
  return useQuery({
    queryKey: usersKeys.list(),
    queryFn: () => http.get<{ users: User[] }>('/api/users').then((r) => r.users),
    enabled,
  });
}

export function useUpdateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...patch }: { id: number; role?: Role; active?: boolean }) =>
      http.patch<{ user: User }>(`/api/users/${id}`, patch).then((r) => r.user),
    onSuccess: () => void qc.invalidateQueries({ queryKey: usersKeys.all }),
  });
}
