import nodemailer, { type Transporter } from 'nodemailer';

export interface SmtpSettings {
  host: string;
  port: number;
  /** true: TLS from the first byte (port 465). false: plain, upgraded with STARTTLS if offered. */
  secure: boolean;
  user?: string;
  password?: string;
  /** Development and tests: the local catcher offers no TLS, so do not try STARTTLS. */
  ignoreTls?: boolean;
}

/** A nodemailer SMTP transport. One connection per message (no pool), short timeouts. */
export function createMailTransport(smtp: SmtpSettings): Transporter {
  return nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: smtp.secure,
    ignoreTLS: smtp.ignoreTls ?? false,
    ...(smtp.user ? { auth: { user: smtp.user, pass: smtp.password ?? '' } } : {}),
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  });
}
