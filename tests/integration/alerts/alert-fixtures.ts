// Builders for the alert tests: a crew of lead, mechanic, two riders (one owns the machine) and another
// crew's lead; invented names and addresses.
import type { Kysely } from 'kysely';
import type { Database, Role } from '~/lib/db/database';
import { confirmLabImport, storeLabFile } from '~/lib/lab-import/lab-import.service';
import { addMember, makeCrew, makeMachine, makeUser } from '../factories';
import { bytesOf } from '../lab-import/lab-import-fixtures';

export async function makeAlertCrew(db: Kysely<Database>, name = 'Valley school') {
  const crew = await makeCrew(db, name);
  const member = async (role: Role, label: string) => {
    const u = await makeUser(db, { email: `${label}-${crew.id.slice(0, 6)}@valley.example` });
    await addMember(db, crew.id, u.id, role);
    return u;
  };
  const lead = await member('lead', 'lead');
  const mechanic = await member('mechanic', 'mechanic');
  const rider = await member('rider', 'rider');
  const otherRider = await member('rider', 'other-rider');
  const machine = await makeMachine(db, crew.id, rider.id, { name: 'Ridge 450', max_interval_distance: 3000 } as never);
  const otherCrew = await makeCrew(db, 'Other crew');
  const otherLead = await makeUser(db, { email: `other-lead-${otherCrew.id.slice(0, 6)}@other.example` });
  await addMember(db, otherCrew.id, otherLead.id, 'lead');
  return {
    crewId: crew.id,
    crewName: crew.name,
    lead,
    mechanic,
    rider,
    otherRider,
    machineId: machine.id,
    otherCrewId: otherCrew.id,
    otherLead,
  };
}

/** Uploads and confirms a lab CSV as the given user; throws if refused. */
export async function importCsv(
  db: Kysely<Database>,
  crewId: string,
  userId: string,
  csv: string,
  fileName = 'report.csv',
) {
  const stored = await storeLabFile(db, { crewId, userId, fileName, bytes: bytesOf(csv) });
  if (!stored.ok) throw new Error(`upload refused: ${stored.message}`);
  const confirmed = await confirmLabImport(db, { crewId, userId, labFileId: stored.value.labFileId, decisions: {} });
  if (!confirmed.ok) throw new Error(`confirm refused: ${confirmed.message}`);
  return confirmed.value;
}

/** Outbox rows by recipient address. */
export async function outboxByRecipient(db: Kysely<Database>, kind?: string) {
  let q = db.selectFrom('mail_outbox').selectAll().orderBy('to_address');
  if (kind) q = q.where('kind', '=', kind);
  const rows = await q.execute();
  const map = new Map<string, typeof rows>();
  for (const r of rows) map.set(r.to_address, [...(map.get(r.to_address) ?? []), r]);
  return map;
}

/** The token in a message's List-Unsubscribe header. */
export function tokenFromHeaders(headers: Record<string, string>): string {
  const m = /^<[^>]*\/api\/unsubscribe\?token=([^>]+)>$/.exec(headers['List-Unsubscribe'] ?? '');
  if (!m) throw new Error(`no one-click unsubscribe address in ${JSON.stringify(headers)}`);
  return decodeURIComponent(m[1]!);
}
