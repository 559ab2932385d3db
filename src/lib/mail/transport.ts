import nodemailer, { type SendMailOptions, type TransportOptions } from 'nodemailer';

/** The part of a nodemailer transporter the outbox needs; a test may pass its own. */
export interface MailTransport {
  sendMail(message: SendMailOptions): Promise<{ response?: string; messageId?: string }>;
  close(): void;
}

/** A nodemailer SMTP transport for SMTP_URL (smtp:// or smtps://, optional user:password@). */
export function createMailTransport(smtpUrl: string): MailTransport {
  return nodemailer.createTransport({
    url: smtpUrl,
    // Short time-outs: the worker holds the outbox row lock while it talks to the relay, and a relay that
    // hangs must fail the attempt (to be retried) rather than stall the queue. nodemailer's defaults are
    // minutes long.
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  } as TransportOptions & { url: string });
}
