// The demo's lab mail (invented): an invented lab that sends its results by e-mail, as a spreadsheet with one
// row per test (its own invented layout), for the school's bottle that is still at the lab. On the first
// `npm start` the mail goes to the school's import address through the local relay, so the notice with the
// preview link waits in /dev/mailbox. No real lab, person or report format.
import ExcelJS from 'exceljs';
import type { Kysely, Transaction } from 'kysely';
import nodemailer from 'nodemailer';
import MailComposer from 'nodemailer/lib/mail-composer';
import type { Database } from '../src/lib/db/database';
import { getImportAddress } from '../src/lib/lab-mail/lab-mail.service';
import { DEMO_SCHOOL_NAME } from './seed-accounts';
import { inventReadings } from './seed-labs';

type Db = Kysely<Database> | Transaction<Database>;

/** The invented lab that mails its reports. */
export const DEMO_MAIL_LAB = { name: 'Quillmere Wear Lab', sender: 'results@quillmere-lab.example' } as const;

/** Demo step inside seedDemo: the school accepts lab mail only from the lab it uses. */
export async function seedImportSenders(db: Db, input: { crewId: string; userId: string }): Promise<void> {
  await db
    .insertInto('import_address_senders')
    .values({ crew_id: input.crewId, address: DEMO_MAIL_LAB.sender, added_by: input.userId })
    .onConflict((oc) => oc.doNothing())
    .execute();
}

const TEST_NAMES: readonly [code: string, name: string, unit: string][] = [
  ['Fe', 'Iron', 'ppm'],
  ['Al', 'Aluminium', 'ppm'],
  ['Cr', 'Chromium', 'ppm'],
  ['Cu', 'Copper', 'ppm'],
  ['Pb', 'Lead', 'ppm'],
  ['Sn', 'Tin', 'ppm'],
  ['Ni', 'Nickel', 'ppm'],
  ['Si', 'Silicon', 'ppm'],
  ['Na', 'Sodium', 'ppm'],
  ['K', 'Potassium', 'ppm'],
  ['B', 'Boron', 'ppm'],
  ['Mo', 'Molybdenum', 'ppm'],
  ['Zn', 'Zinc', 'ppm'],
  ['P', 'Phosphorus', 'ppm'],
  ['Ca', 'Calcium', 'ppm'],
  ['Mg', 'Magnesium', 'ppm'],
  ['KV40', 'Viscosity 40 °C', 'cSt'],
  ['KV100', 'Viscosity 100 °C', 'cSt'],
  ['TBN', 'TBN', 'mg KOH/g'],
  ['FUEL', 'Fuel dilution', '%'],
  ['WATER', 'Water', '%'],
  ['GLYCOL', 'Glycol', ''],
  ['FLASH', 'Flash point', '°C'],
];

/** The lab's workbook: a title block, then one row per test of the bottle (an invented layout). */
export async function buildDemoLabWorkbook(
  bottle: string,
  sampled: string,
  readings: ReturnType<typeof inventReadings>,
): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = DEMO_MAIL_LAB.name;
  const ws = wb.addWorksheet('Results by test');
  ws.addRow([`${DEMO_MAIL_LAB.name} — results by test`]);
  ws.addRow(['Invented demo lab; figures invented for the demo.']);
  ws.addRow([]);
  ws.addRow(['Kit number', 'Sampled', 'Test', 'Result', 'Unit']);
  const date = new Date(`${sampled}T00:00:00Z`);
  for (const [code, name, unit] of TEST_NAMES) {
    const r = readings[code as keyof typeof readings];
    if (!r) continue;
    const value =
      code === 'GLYCOL' ? (r.value > 0 ? 'positive' : 'negative') : r.qualifier ? `${r.qualifier}${r.value}` : r.value;
    ws.addRow([bottle, date, name, value, unit]);
  }
  ws.getColumn(2).numFmt = 'dd.mm.yyyy';
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/** The demo mail (raw MIME) for the school's bottle still at the lab, or null when there is none. */
export async function buildDemoLabMail(
  db: Db,
  domain: string,
): Promise<{ to: string; raw: Buffer; bottle: string } | null> {
  const crew = await db.selectFrom('crews').select('id').where('name', '=', DEMO_SCHOOL_NAME).executeTakeFirst();
  if (!crew) return null;
  const waiting = await db
    .selectFrom('samples')
    .select(['id', 'machine_id', 'bottle_code', 'drawn_on', 'sae_grade'])
    .where('crew_id', '=', crew.id)
    .where((eb) =>
      eb.not(
        eb.exists(eb.selectFrom('readings').select('sample_id').whereRef('readings.sample_id', '=', 'samples.id')),
      ),
    )
    .orderBy('drawn_on', 'desc')
    .executeTakeFirst();
  if (!waiting) return null;
  const count = await db
    .selectFrom('samples')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('machine_id', '=', waiting.machine_id)
    .executeTakeFirstOrThrow();
  const n = Number(count.n);
  // The air-cooled single's short winter trips go on: more fuel in the oil than last time.
  const readings = inventReadings('fuel-dilution', n - 1, n, waiting.sae_grade);
  readings.FUEL = { value: 7.1 };
  const workbook = await buildDemoLabWorkbook(waiting.bottle_code, waiting.drawn_on, readings);
  const { address } = await getImportAddress(db, crew.id, domain);
  const composer = new MailComposer({
    from: `${DEMO_MAIL_LAB.name} <${DEMO_MAIL_LAB.sender}>`,
    to: address,
    subject: `${DEMO_MAIL_LAB.name}: results for kit ${waiting.bottle_code}`,
    text: `Hello,\n\nthe results for kit ${waiting.bottle_code} are attached as a spreadsheet.\n\n${DEMO_MAIL_LAB.name} (an invented demo lab)\n`,
    messageId: `<demo-${waiting.bottle_code.toLowerCase().replace(/[^a-z0-9]/g, '')}@quillmere-lab.example>`,
    attachments: [
      {
        filename: `quillmere-${waiting.bottle_code.toLowerCase()}.xlsx`,
        content: workbook,
        contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      },
    ],
  });
  const raw = await new Promise<Buffer>((resolve, reject) =>
    composer.compile().build((error, message) => (error ? reject(error) : resolve(message))),
  );
  return { to: address, raw, bottle: waiting.bottle_code };
}

/** Send the demo lab mail through the relay at smtpUrl; returns a line for the start log. */
export async function sendDemoLabMail(
  db: Kysely<Database>,
  options: { smtpUrl: string; domain: string },
): Promise<string> {
  const mail = await buildDemoLabMail(db, options.domain);
  if (!mail) return 'no bottle is waiting for results, so no lab mail was sent';
  const transport = nodemailer.createTransport({ url: options.smtpUrl, connectionTimeout: 10_000 } as never);
  try {
    await transport.sendMail({ envelope: { from: DEMO_MAIL_LAB.sender, to: [mail.to] }, raw: mail.raw });
  } finally {
    transport.close();
  }
  return `${DEMO_MAIL_LAB.name} mailed the results of bottle ${mail.bottle} to the school's import address; the notice with the preview link waits at /dev/mailbox`;
}
