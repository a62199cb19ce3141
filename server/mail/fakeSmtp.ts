import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { DataSource } from 'typeorm';
import { MailMessageEntity } from '../db/entities';

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

/**
 * Local SMTP sink for demo and tests: accepts any sender, optional auth, no TLS, and stores each
 * message in mail_message so the outbox page and the tests can read it.
 */
export async function startFakeSmtp(opts: { dataSource: DataSource; host?: string; port: number }): Promise<FakeSmtp> {
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    banner: 'Fluxwright local mail sink',
    size: 10 * 1024 * 1024,
    logger: false,
    onAuth(_auth, _session, cb) {
      cb(null, { user: 'local' });
    },
    onData(stream, session, cb) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', cb);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) =>
            opts.dataSource.getRepository(MailMessageEntity).insert({
              to: addresses(parsed.to) || session.envelope.rcptTo.map((r) => r.address).join(', '),
              from: addresses(parsed.from) || (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
              subject: (parsed.subject ?? '').slice(0, 500),
              text: parsed.text ?? '',
              html: typeof parsed.html === 'string' ? parsed.html : null,
              raw: raw.toString('utf8'),
              receivedAt: new Date(),
            }),
          )
          .then(() => cb(), (e: Error) => cb(e));
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, opts.host ?? '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
