// A local fake of the mail relay: accepts mail on 127.0.0.1 at SMTP_URL's port and files it in the
// dev_mailbox table of DATABASE_URL (shown at /dev/mailbox when DEV_MAILBOX=1). Never run it in production.
// Usage: node --import tsx scripts/mail-relay.ts
import { readConfig } from '../src/lib/config';
import { createDb } from '../src/lib/db/db';
import { startMailRelay } from '../src/lib/mail/relay';

const config = readConfig();
const url = new URL(config.SMTP_URL);
const port = Number(url.port || (url.protocol === 'smtps:' ? 465 : 25));
if (url.protocol !== 'smtp:') {
  console.error(`[mail-relay] SMTP_URL must be smtp:// for the local relay (it has no TLS), got ${url.protocol}`);
  process.exit(1);
}

const db = createDb(config.DATABASE_URL, { max: 3 });
let relay: Awaited<ReturnType<typeof startMailRelay>>;
try {
  relay = await startMailRelay({
    db,
    port,
    host: '127.0.0.1',
    inboundDomain: config.INBOUND_MAIL_DOMAIN,
    log: (line) => console.log(line),
  });
} catch (error) {
  console.error(`[mail-relay] ${error instanceof Error ? error.message : String(error)}`);
  await db.destroy();
  process.exit(1);
}
console.log(
  `[mail-relay] listening on smtp://${relay.host}:${relay.port}, storing mail in dev_mailbox (lab mail to *@${config.INBOUND_MAIL_DOMAIN} goes to the crews' imports)`,
);

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  await relay.close();
  await db.destroy();
  console.log(`[mail-relay] stopped (${signal})`);
  process.exit(0);
};
process.once('SIGTERM', () => void stop('SIGTERM'));
process.once('SIGINT', () => void stop('SIGINT'));
