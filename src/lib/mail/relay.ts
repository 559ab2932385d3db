import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { insertDevMail } from './mail.repository';
import { parseMime } from './mime';

// A local stand-in for the mail relay: it accepts every message on 127.0.0.1 without auth or TLS and files
// it in the dev_mailbox table, where /dev/mailbox shows it. Development and tests only.

export interface MailRelayOptions {
  db: Kysely<Database>;
  host?: string;
  /** 0 picks a free port (tests). */
  port: number;
  /** Largest accepted message; the relay answers 552 above it. */
  maxBytes?: number;
  log?: (line: string) => void;
}

export interface RunningMailRelay {
  host: string;
  port: number;
  close(): Promise<void>;
}

/** Starts the fake relay; rejects with a one-line reason (port in use…) when it cannot listen. */
export async function startMailRelay(options: MailRelayOptions): Promise<RunningMailRelay> {
  const host = options.host ?? '127.0.0.1';
  const maxBytes = options.maxBytes ?? 10 * 1024 * 1024;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    hideSTARTTLS: true,
    logger: false,
    banner: 'Sumpwise local relay (development only)',
    size: maxBytes,
    closeTimeout: 1_000,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error('message too large'), { responseCode: 552 }));
          return;
        }
        const raw = Buffer.concat(chunks).toString('utf8');
        const parsed = parseMime(raw);
        const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : null;
        insertDevMail(options.db, {
          message_id: parsed.messageId,
          envelope_from: envelopeFrom,
          envelope_to: session.envelope.rcptTo.map((r) => r.address).join(', '),
          from_header: parsed.from,
          to_header: parsed.to,
          subject: parsed.subject,
          text_body: parsed.text,
          html_body: parsed.html,
          raw,
        }).then(
          (id) => {
            options.log?.(`[mail-relay] #${id} to ${session.envelope.rcptTo.map((r) => r.address).join(', ')}: ${parsed.subject}`);
            callback(null, `queued as dev-${id}`);
          },
          // 451 is "try again later": the sender keeps the message rather than losing it.
          (error: unknown) => {
            options.log?.(`[mail-relay] could not store a message: ${error instanceof Error ? error.message : String(error)}`);
            callback(Object.assign(new Error('local mailbox unavailable, try again later'), { responseCode: 451 }));
          },
        );
      });
    },
  });
  // Errors before listening are the start's rejection below; after that, only logged.
  let listening = false;
  server.on('error', (error) => {
    if (listening) options.log?.(`[mail-relay] ${error.message}`);
  });

  const port = await new Promise<number>((resolve, reject) => {
    const onError = (error: NodeJS.ErrnoException) => {
      reject(new Error(
        error.code === 'EADDRINUSE'
          ? `port ${options.port} on ${host} is already in use (another relay running?)`
          : `cannot listen on ${host}:${options.port}: ${error.message}`,
      ));
    };
    server.server.once('error', onError);
    server.listen(options.port, host, () => {
      server.server.off('error', onError);
      listening = true;
      resolve((server.server.address() as AddressInfo).port);
    });
  });

  return {
    host,
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
