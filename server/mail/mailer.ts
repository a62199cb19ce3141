import nodemailer from 'nodemailer';
import type { Config } from '../config';

export interface InvitationMail {
  to: string;
  inviteeName: string;
  inviterName: string;
  labName: string;
  role: string;
  link: string;
  expiresAt: Date;
}

export interface PasswordResetMail {
  to: string;
  name: string;
  link: string;
  expiresAt: Date;
}

/** Everything the API sends by e-mail. A real SMTP relay is a config change (FW_SMTP_*), not a code change. */
export interface Mailer {
  sendInvitation(m: InvitationMail): Promise<void>;
  sendPasswordReset(m: PasswordResetMail): Promise<void>;
  close(): Promise<void>;
}

const ROLE_WORDS: Record<string, string> = {
  lab_lead: 'lab lead',
  device_engineer: 'device engineer',
  experimentalist: 'experimentalist',
};

export function invitationText(m: InvitationMail): { subject: string; text: string } {
  return {
    subject: `${m.inviterName} invited you to ${m.labName} on Fluxwright`,
    text: [
      `Hello ${m.inviteeName},`,
      '',
      `${m.inviterName} invited you to join ${m.labName} on Fluxwright as ${ROLE_WORDS[m.role] ?? m.role}.`,
      'Open this link to choose your password:',
      '',
      m.link,
      '',
      `The link works once and expires on ${m.expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
    ].join('\n'),
  };
}

export function passwordResetText(m: PasswordResetMail): { subject: string; text: string } {
  return {
    subject: 'Reset your Fluxwright password',
    text: [
      `Hello ${m.name},`,
      '',
      'Someone (hopefully you) asked to reset your Fluxwright password. Open this link to choose a new one:',
      '',
      m.link,
      '',
      `The link works once and expires on ${m.expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
      'If you did not ask for this, ignore this message; your password stays as it is.',
    ].join('\n'),
  };
}

export function createSmtpMailer(cfg: Pick<Config, 'smtp' | 'mailFrom'>): Mailer {
  const transport = nodemailer.createTransport({
    host: cfg.smtp.host,
    port: cfg.smtp.port,
    secure: cfg.smtp.secure,
    auth: cfg.smtp.user ? { user: cfg.smtp.user, pass: cfg.smtp.pass ?? '' } : undefined,
  });
  const send = async (to: string, subject: string, text: string) => {
    await transport.sendMail({ from: cfg.mailFrom, to, subject, text });
  };
  return {
    async sendInvitation(m) {
      const { subject, text } = invitationText(m);
      await send(m.to, subject, text);
    },
    async sendPasswordReset(m) {
      const { subject, text } = passwordResetText(m);
      await send(m.to, subject, text);
    },
    async close() {
      transport.close();
    },
  };
}
