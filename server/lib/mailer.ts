/**
 * Outgoing e-mail through nodemailer over SMTP. In development and tests SMTP_HOST/SMTP_PORT
 * point at the local sink started by the scripts (scripts/mail-sink.ts), which writes every
 * message into .data/mail*.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { env } from '../env';

let transport: Transporter | undefined;

function transporter(): Transporter {
  const { SMTP_HOST, SMTP_PORT } = env();
  transport ??= nodemailer.createTransport({
    host: SMTP_HOST,
    port: SMTP_PORT,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5000,
  });
  return transport;
}

export interface Mail {
  to: string;
  cc?: string[];
  subject: string;
  text: string;
}

export async function sendMail(mail: Mail): Promise<void> {
  await transporter().sendMail({ from: env().MAIL_FROM, ...mail });
}

export function closeMailer() {
  transport?.close();
  transport = undefined;
}
