// Reading what the local relay received (dev_mailbox), for tests that follow links from e-mails.
import { sql, type Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';

/** Waits until a message to `to` whose subject matches arrives; returns its mailbox id and text. */
export async function waitForMail(
  db: Kysely<Database>,
  to: string,
  subject: RegExp,
  timeoutMs = 45_000,
): Promise<{ id: number; text: string }> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const { rows } = await sql<{ id: number; subject: string; text_body: string | null }>`
      select id, subject, text_body from dev_mailbox where envelope_to ilike ${`%${to}%`} order by id desc`.execute(db);
    const hit = rows.find((r) => subject.test(r.subject));
    if (hit) return { id: Number(hit.id), text: hit.text_body ?? '' };
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
}
