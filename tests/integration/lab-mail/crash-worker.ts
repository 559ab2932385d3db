// A worker that dies the hard way (SIGKILL, no cleanup) in the middle of processing inbound lab mail: after
// the attachments were stored inside the message's transaction, before it commits. Run by
// lab-mail-crash.test.ts as a child process: node --import tsx crash-worker.ts <database url>
import { createDb } from '~/lib/db/db';
import { processInboundMails } from '~/lib/lab-mail/lab-mail.service';
import { env } from './lab-mail-fixtures';

const url = process.argv[2];
if (!url) throw new Error('usage: crash-worker.ts <database url>');
const db = createDb(url, { max: 2 });
await processInboundMails(db, {
  env,
  hooks: {
    afterStore: async (trx) => {
      const { rows } = await (
        await import('kysely')
      ).sql<{ n: number }>`select count(*)::int as n from lab_files`.execute(trx);
      // Proof for the test that the kill really came after storage: the files exist inside the transaction.
      process.stdout.write(`stored-in-transaction ${rows[0]?.n ?? 0}\n`);
      process.kill(process.pid, 'SIGKILL');
      await new Promise(() => {});
    },
  },
});
process.stdout.write('not killed\n');
