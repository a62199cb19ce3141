import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '../api/http';
import type { ApiTokenInfo } from '../api/types';

export const tokensKeys = {
  all: ['tokens'] as const,
  list: () => [...tokensKeys.all, 'list'] as const,
};

export function useApiTokens() {
  return useQuery({
    queryKey: tokensKeys.list(),
    queryFn: () => http.get<{ tokens: ApiTokenInfo[] }>('/api/tokens').then((r) => r.tokens),
  });
}

export function useCreateApiToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; scopes?: string[] }) =>
      http.post<{ token: string; apiToken: ApiTokenInfo }>('/api/tokens', body),
    onSuccess: () => void qc.invalidateQueries({ queryKey: tokensKeys.all }),
  });
}

export function useRevokeApiToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => http.del(`/api/tokens/${id}`),
    onSuccess: () => void qc.invalidateQueries({ queryKey: tokensKeys.all }),
  });
}
