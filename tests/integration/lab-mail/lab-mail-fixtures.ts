// Shared builders of the lab mail tests: a crew with a lead and a mechanic, its import address, and raw
// MIME messages built with nodemailer's own composer (so the MIME is what a real mail client writes).
import ExcelJS from 'exceljs';
import type { Kysely } from 'kysely';
import MailComposer from 'nodemailer/lib/mail-composer';
import type { AlertEnv } from '~/lib/alerts/alerts';
import type { Database } from '~/lib/db/database';
import { getImportAddress } from '~/lib/lab-mail/lab-mail.service';
import { addMember, makeCrew, makeUser } from '../factories';

export const DOMAIN = 'import.sumpwise.test';
export const env: AlertEnv = {
  publicUrl: 'https://sumpwise.test',
  secret: 'lab-mail-test-secret-of-at-least-32-chars',
};
export const LAB_SENDER = 'results@hollow-creek.example';

/** A crew with a lead and a mechanic (both verified), and its import address. */
export async function makeMailCrew(db: Kysely<Database>, name = 'Mail crew') {
  const crew = await makeCrew(db, name);
  const lead = await makeUser(db, { displayName: 'Lead' });
  const mechanic = await makeUser(db, { displayName: 'Mechanic' });
  await addMember(db, crew.id, lead.id, 'lead');
  await addMember(db, crew.id, mechanic.id, 'mechanic');
  const { address } = await getImportAddress(db, crew.id, DOMAIN);
  return { crew, lead, mechanic, address };
}

export const LAB_CSV = 'Bottle,Sampled,Fe,Al,Si\nMAIL-001,2026-03-02,14,3,6\nMAIL-002,2026-03-09,21,4,<1\n';

/** A small workbook: a title block, then a header and one bottle with a typed date. */
export async function makeLabWorkbook(bottle = 'MAIL-003'): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Results');
  ws.addRow(['Hollow Creek Oil Lab — results']);
  ws.addRow([]);
  ws.addRow(['Bottle', 'Sampled', 'Fe', 'Cu']);
  ws.addRow([bottle, new Date(Date.UTC(2026, 2, 16)), 17, 2.5]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

export interface MailParts {
  from?: string;
  to: string;
  subject?: string;
  messageId?: string;
  attachments?: { filename: string; content: Buffer | string; contentType?: string }[];
}

/** A raw MIME message. */
export function composeMail(parts: MailParts): Promise<Buffer> {
  const composer = new MailComposer({
    from: parts.from ?? LAB_SENDER,
    to: parts.to,
    subject: parts.subject ?? 'Your oil analysis results',
    text: 'Results attached.',
    messageId: parts.messageId ?? '<fixed-1@hollow-creek.example>',
    date: new Date(Date.UTC(2026, 2, 20, 8, 0, 0)),
    attachments: parts.attachments ?? [],
  });
  return new Promise((resolve, reject) =>
    composer.compile().build((error, message) => (error ? reject(error) : resolve(message))),
  );
}

export async function countLabFiles(db: Kysely<Database>, crewId: string): Promise<number> {
  const row = await db
    .selectFrom('lab_files')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('crew_id', '=', crewId)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}
