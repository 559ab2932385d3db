import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { insertDevMail } from './mail.repository';
import { parseMime } from './mime';
import { isImportDomain, MAX_INBOUND_MAIL_BYTES } from '../lab-mail/lab-mail';
import { receiveInboundMail } from '../lab-mail/lab-mail.service';

// A local stand-in for the mail relay: it accepts every message on 127.0.0.1 without auth or TLS and files
// it in the dev_mailbox table, where /dev/mailbox shows it. Mail to an import address (the inbound domain)
// goes instead to the crew's inbound lab mail, exactly as the production webhook hands it over. Development
// and tests only.

export interface MailRelayOptions {
  db: Kysely<Database>;
  host?: string;
  /** 0 picks a free port (tests). */
  port: number;
  /** Largest accepted message; the relay answers 552 above it. */
  maxBytes?: number;
  /** Domain of the crews' import addresses; mail to it is stored as inbound lab mail. */
  inboundDomain?: string;
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
  // Room for the largest lab mail (25 MiB) when the relay takes inbound mail; 10 MiB otherwise.
  const maxBytes = options.maxBytes ?? (options.inboundDomain ? MAX_INBOUND_MAIL_BYTES : 10 * 1024 * 1024);
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
      let size = 0;
      stream.on('data', (chunk: Buffer) => {
        size += chunk.length;
        // Past the limit the bytes are only counted, so a huge message cannot fill the memory.
        if (size <= maxBytes) chunks.push(chunk);
      });
      stream.on('end', () => {
        const inbound = options.inboundDomain
          ? session.envelope.rcptTo.map((r) => r.address).filter((a) => isImportDomain(a, options.inboundDomain ?? ''))
          : [];
        if (inbound.length > 0) {
          void receiveLabMail(
            options,
            session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
            inbound,
            Buffer.concat(chunks),
            size,
            stream.sizeExceeded === true,
          ).then((answer) => callback(answer.error, answer.message));
          return;
        }
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
            options.log?.(
              `[mail-relay] #${id} to ${session.envelope.rcptTo.map((r) => r.address).join(', ')}: ${parsed.subject}`,
            );
            callback(null, `queued as dev-${id}`);
          },
          // 451 is "try again later": the sender keeps the message rather than losing it.
          (error: unknown) => {
            options.log?.(
              `[mail-relay] could not store a message: ${error instanceof Error ? error.message : String(error)}`,
            );
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
      reject(
        new Error(
          error.code === 'EADDRINUSE'
            ? `port ${options.port} on ${host} is already in use (another relay running?)`
            : `cannot listen on ${host}:${options.port}: ${error.message}`,
        ),
      );
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

/** Store one message for each import address it was sent to; the SMTP answer says what happened. */
async function receiveLabMail(
  options: MailRelayOptions,
  envelopeFrom: string | null,
  recipients: readonly string[],
  raw: Buffer,
  size: number,
  tooLarge: boolean,
): Promise<{ error: Error | null; message?: string }> {
  const outcomes = [];
  try {
    for (const recipient of recipients) {
      outcomes.push(
        await receiveInboundMail(options.db, {
          via: 'smtp',
          envelopeFrom,
          recipient,
          raw,
          domain: options.inboundDomain ?? '',
          byteSize: tooLarge ? Math.max(size, (options.maxBytes ?? 0) + 1) : size,
          log: options.log,
        }),
      );
    }
  } catch (error) {
    options.log?.(`[mail-relay] could not store lab mail: ${error instanceof Error ? error.message : String(error)}`);
    // 451: try again later; the sender keeps the message.
    return { error: Object.assign(new Error('lab mail storage unavailable, try again later'), { responseCode: 451 }) };
  }
  const refused = outcomes.find((o) => o.status === 'refused');
  if (refused && refused.status === 'refused' && outcomes.every((o) => o.status === 'refused')) {
    return { error: Object.assign(new Error(refused.reason), { responseCode: refused.smtpCode }) };
  }
  options.log?.(`[mail-relay] lab mail to ${recipients.join(', ')}: ${outcomes.map((o) => o.status).join(', ')}`);
  return {
    error: null,
    message: outcomes.every((o) => o.status === 'duplicate') ? 'already received' : 'stored for import',
  };
}
