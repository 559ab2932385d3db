/** The reminder jobs' queries: across every crew, since the worker serves them all. */
import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database, Meter } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

export interface MachineDueRow {
  id: string;
  crew_id: string;
  crew_name: string;
  owner_user_id: string;
  name: string;
  meter: Meter;
  next_sample_on: string | null;
  next_sample_odometer: number | null;
  last_change_on: string | null;
  last_change_odometer: number | null;
  max_interval_distance: number | null;
  max_interval_days: number | null;
  /** A bottle drawn or shipped and not yet back: the sample is taken, so no "due" reminder. */
  has_open_sample: boolean;
}

/** Every active machine with its latest interval call, last oil change and manufacturer limits. */
export async function listMachinesForDueCheck(db: Db): Promise<MachineDueRow[]> {
  const { rows } = await sql<MachineDueRow>`
    select m.id, m.crew_id, c.name as crew_name, m.owner_user_id, m.name, m.meter,
      ic.next_sample_on::text as next_sample_on, ic.next_sample_odometer,
      oc.changed_on::text as last_change_on, oc.odometer as last_change_odometer, m.max_interval_distance, m.max_interval_days,
      exists (select 1 from samples s where s.machine_id = m.id and s.state in ('drawn', 'shipped')) as has_open_sample
    from machines m
    join crews c on c.id = m.crew_id
    left join lateral (select next_sample_on, next_sample_odometer from interval_calls where machine_id = m.id order by created_at desc, id desc limit 1) ic on true
    left join lateral (select changed_on, odometer from oil_changes where machine_id = m.id order by odometer desc, changed_on desc limit 1) oc on true
    where m.archived_at is null
    order by m.crew_id, m.id`.execute(db);
  return rows.map((r) => ({
    ...r,
    next_sample_odometer: r.next_sample_odometer === null ? null : Number(r.next_sample_odometer),
    last_change_odometer: r.last_change_odometer === null ? null : Number(r.last_change_odometer),
    max_interval_distance: r.max_interval_distance === null ? null : Number(r.max_interval_distance),
    max_interval_days: r.max_interval_days === null ? null : Number(r.max_interval_days),
  }));
}

export interface ShippedSampleRow {
  id: string;
  crew_id: string;
  crew_name: string;
  machine_id: string;
  machine_name: string;
  owner_user_id: string;
  bottle_code: string;
  shipped_on: string;
}

/** Samples still shipped (no results) whose shipping date (its latest "shipped" event, else the drawing date) is on or before `shippedBefore`. */
export async function listShippedSamples(db: Db, shippedBefore: string): Promise<ShippedSampleRow[]> {
  const { rows } = await sql<ShippedSampleRow>`
    select * from (
      select s.id, s.crew_id, c.name as crew_name, m.id as machine_id, m.name as machine_name, m.owner_user_id, s.bottle_code,
        coalesce((select max(e.at) from sample_events e where e.sample_id = s.id and e.state = 'shipped')::date, s.drawn_on)::text as shipped_on
      from samples s join machines m on m.id = s.machine_id join crews c on c.id = s.crew_id
      where s.state = 'shipped' and m.archived_at is null
    ) x
    where x.shipped_on::date <= ${shippedBefore}::date
    order by x.crew_id, x.shipped_on, x.id`.execute(db);
  return rows;
}

/** Invitations neither accepted nor revoked, made between `createdAfter` and `createdBefore`. */
export async function listPendingInvitations(db: Db, createdAfter: Date, createdBefore: Date) {
  return db
    .selectFrom('crew_invitations')
    .innerJoin('crews', 'crews.id', 'crew_invitations.crew_id')
    .select([
      'crew_invitations.id',
      'crew_invitations.crew_id',
      'crews.name as crew_name',
      'crew_invitations.email',
      'crew_invitations.created_at',
      'crew_invitations.expires_at',
    ])
    .where('crew_invitations.accepted_at', 'is', null)
    .where('crew_invitations.revoked_at', 'is', null)
    .where('crew_invitations.created_at', '>=', createdAfter)
    .where('crew_invitations.created_at', '<=', createdBefore)
    .orderBy('crew_invitations.crew_id')
    .orderBy('crew_invitations.created_at')
    .execute();
}
