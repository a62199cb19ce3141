import { EntitySchema } from 'typeorm';
import { idColumn, instant, varchar } from './columns';

/** A message caught by the fake SMTP server (demo and tests); real deployments send elsewhere. */
export interface MailMessageRow {
  id: number;
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string | null;
  raw: string;
  receivedAt: Date;
}

export const MailMessageEntity = new EntitySchema<MailMessageRow>({
  name: 'MailMessage',
  tableName: 'mail_message',
  columns: {
    id: idColumn,
    to: varchar(1000),
    from: varchar(320),
    subject: varchar(500),
    text: { type: 'longtext' },
    html: { type: 'longtext', nullable: true },
    raw: { type: 'longtext' },
    receivedAt: instant(),
  },
});
