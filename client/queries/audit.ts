import { useQuery } from '@tanstack/react-query';
import { http } from '../api/http';
import type { AuditEvent } from '../api/types';

export const auditKeys = {
  all: ['audit'] as const,
  list: () => [...auditKeys.all, 'list'] as const,
};

export function useAuditEvents(enabled = true) {
  return useQuery({
    queryKey: auditKeys.list(),
    queryFn: () => http.get<{ events: AuditEvent[] }>('/api/audit').then((r) => r.events),
    enabled,
  });
}
