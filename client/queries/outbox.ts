import { useQuery } from '@tanstack/react-query';
import { http } from '../api/http';
import type { OutboxMessage } from '../api/types';

export const outboxKeys = {
  all: ['outbox'] as const,
  list: () => [...outboxKeys.all, 'list'] as const,
};

/** Demo-mode outbox (lab lead only); the server answers 404 when demo mode is off. */
export function useOutbox(enabled = true) {
  return useQuery({
    queryKey: outboxKeys.list(),
    queryFn: () => http.get<{ messages: OutboxMessage[] }>('/api/outbox').then((r) => r.messages),
    enabled,
    retry: false,
  });
}
