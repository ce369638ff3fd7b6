import nodemailer from 'nodemailer';
import type { DataSource } from 'typeorm';
import { insertOutboxMessage } from '../db/repositories/outbox';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  /** the team the message is sent for (e.g. an invitation), so that team's owners see it in the outbox */
  teamId?: string | null;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<{ id: string }>;
}

export const fromAddress = 'Tacet <no-reply@tacet.example>';

/**
 * Renders every message with nodemailer's JSON transport (a real MIME-level rendering, no network)
 * and stores it in outbox_messages, which owners read in development mode. Swapping in an SMTP
 * transport later changes only this module.
 */
export function createMailer(dataSource: DataSource): Mailer {
  const transport = nodemailer.createTransport({ jsonTransport: true });
  return {
    async send(mail) {
      const info = await transport.sendMail({ from: fromAddress, to: mail.to, subject: mail.subject, text: mail.text });
      const envelope = JSON.parse(info.message as unknown as string) as Record<string, unknown>;
      const row = await insertOutboxMessage(dataSource.manager, {
        teamId: mail.teamId ?? null,
        toAddress: mail.to.toLowerCase(),
        subject: mail.subject,
        text: mail.text,
        envelope,
      });
      return { id: row.id };
    },
  };
}
