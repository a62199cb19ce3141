import type { DataSource } from 'typeorm';
import type { OutboxMessage } from '@/shared/api/outbox';
import { MailMessageEntity } from '../../db/entities';

const LINK = /https?:\/\/[^\s<>"')\]]+/g;

export function extractLinks(text: string): string[] {
  return text.match(LINK) ?? [];
}

/** Newest first. Demo mode only: the sink holds every lab's mail, which is fine for one demo lab. */
export async function listOutbox(ds: DataSource, limit = 100): Promise<OutboxMessage[]> {
  const rows = await ds.getRepository(MailMessageEntity).find({ order: { receivedAt: 'DESC', id: 'DESC' }, take: limit });
  return rows.map((m) => ({
    id: m.id,
    to: m.to,
    subject: m.subject,
    text: m.text,
    receivedAt: m.receivedAt.toISOString(),
    links: extractLinks(m.text),
  }));
}
