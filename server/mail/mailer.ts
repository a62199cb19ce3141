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

/** A new fit waits for review (sent to the lab's active device engineers). */
export interface FitProposedMail {
  to: string;
  name: string;
  labName: string;
  deviceName: string;
  version: number;
  model: string;
  kind: string;
  proposerName: string | null;
  /** Headline result, already formatted (e.g. "f0 = 6.2000 GHz ± 12 kHz"). */
  summary: string;
  link: string;
}

/** A fit became the device's active calibration. */
export interface CalibrationAcceptedMail {
  to: string;
  name: string;
  labName: string;
  deviceName: string;
  version: number;
  reviewerName: string;
  comment: string | null;
  summary: string;
  link: string;
}

/** Everything the API sends by e-mail. A real SMTP relay is a config change (FW_SMTP_*), not a code change. */
export interface Mailer {
  sendInvitation(m: InvitationMail): Promise<void>;
  sendPasswordReset(m: PasswordResetMail): Promise<void>;
  sendFitProposed(m: FitProposedMail): Promise<void>;
  sendCalibrationAccepted(m: CalibrationAcceptedMail): Promise<void>;
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

export function fitProposedText(m: FitProposedMail): { subject: string; text: string } {
  return {
    subject: `${m.deviceName}: fit v${m.version} waits for review`,
    text: [
      `Hello ${m.name},`,
      '',
      `${m.proposerName ?? 'Someone'} proposed calibration fit v${m.version} for device ${m.deviceName} in ${m.labName}`,
      `(${m.kind.replace(/_/g, ' ')} sweep, ${m.model} model).`,
      '',
      m.summary,
      '',
      'Review it (accept or reject) here:',
      '',
      m.link,
    ].join('\n'),
  };
}

export function calibrationAcceptedText(m: CalibrationAcceptedMail): { subject: string; text: string } {
  return {
    subject: `${m.deviceName}: calibration v${m.version} accepted`,
    text: [
      `Hello ${m.name},`,
      '',
      `${m.reviewerName} accepted fit v${m.version} as the active calibration of ${m.deviceName} in ${m.labName}.`,
      m.comment ? `Reviewer's comment: ${m.comment}` : 'No reviewer comment.',
      '',
      m.summary,
      '',
      'Plans for this device should be recomputed from the new calibration:',
      '',
      m.link,
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
    async sendFitProposed(m) {
      const { subject, text } = fitProposedText(m);
      await send(m.to, subject, text);
    },
    async sendCalibrationAccepted(m) {
      const { subject, text } = calibrationAcceptedText(m);
      await send(m.to, subject, text);
    },
    async close() {
      transport.close();
    },
  };
}
