/** Crew overview and the machine page summary: rows from the repository plus the next-sample-due estimate. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import {
  estimateCurrentOdometer,
  findSampleDue,
  type DueStatus,
  type OdometerEstimate,
} from '../home/odometer-estimate';
import type { OverviewPage, OverviewQuery, OverviewRow } from './overview';
import { findMachineOverview, listOdometerHistory, listOverviewPage } from './overview.repository';

export interface MachineSummary extends OverviewRow {
  estimate: OdometerEstimate | null;
  due: DueStatus;
}

/** Today as YYYY-MM-DD in UTC; pages pass it so tests can pin the clock. */
export function todayIso(now = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/** One page of the crew overview. */
export async function loadOverview(db: Kysely<Database>, crewId: string, query: OverviewQuery): Promise<OverviewPage> {
  return listOverviewPage(db, crewId, query);
}

/** The summary at the top of a machine page, or null when the machine is not the crew's. */
export async function loadMachineSummary(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  today = todayIso(),
): Promise<MachineSummary | null> {
  const row = await findMachineOverview(db, crewId, machineId);
  if (!row) return null;
  const history = (await listOdometerHistory(db, [machineId])).get(machineId) ?? [];
  const estimate = estimateCurrentOdometer(history, today);
  const due = findSampleDue({
    today,
    estimate,
    nextSampleOn: row.call?.nextSampleOn ?? null,
    nextSampleOdometer: row.call?.nextSampleOdometer ?? null,
  });
  return { ...row, estimate, due };
}
