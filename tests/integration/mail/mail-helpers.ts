import type { Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';
import { queueMail } from '~/lib/mail/mail.service';
import { renderMailLayout } from '~/lib/mail/templates';

/** Polls until `check` returns true, or fails after timeoutMs. */
export async function waitFor(check: () => Promise<boolean>, timeoutMs = 10_000, what = 'condition'): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`timed out waiting for ${what}`);
}

/** Sleeps; used only to give a wrongly duplicating worker the chance to show itself. */
export const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** An invented test message with the given idempotency key. */
export function testMail(key: string, to = 'rider@example.test') {
  const { text, html } = renderMailLayout({
    title: 'Your next sample is due',
    intro: 'The Ridge 450 is 1,900 km into its oil.',
    paragraphs: ['Draw the sample at the next oil change.'],
    action: { label: 'Open the drain card', url: 'https://sumpwise.test/samples/new' },
  });
  return { to, subject: `Sample due (${key})`, text, html, idempotencyKey: key, kind: 'sample_reminder' };
}

/** Queues a test message outside any business transaction. */
export async function queueTestMail(db: Kysely<Database>, key: string): Promise<void> {
  await queueMail(db, testMail(key));
}

/** How many messages with this subject the fake relay received. */
export async function countReceived(db: Kysely<Database>, key: string): Promise<number> {
  const row = await db
    .selectFrom('dev_mailbox')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('subject', '=', `Sample due (${key})`)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}
