/** The crew home: what needs doing now, each list scoped to the current crew. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { Meter } from '../machines/machines';
import { listOdometerHistory } from '../overview/overview.repository';
import { estimateCurrentOdometer, findSampleDue, type DueStatus, type OdometerEstimate } from './odometer-estimate';
import {
  listMachinesForDue,
  listOpenFindings,
  listOverdueShipments,
  listSamplesInState,
  loadCrewProgress,
} from './home.repository';
import { groupFindingsByMachine } from './home-cards';
import { describeOverdue } from '../words/words';
import { countSteadyReviewQueue, listSampleVerdicts } from '../verdicts/verdicts.repository';

/** Shipped samples without results after this many days surface on the home page (a product rule, no published source). */
export const SHIPPED_OVERDUE_DAYS = 21;

export interface DueMachine {
  id: string;
  name: string;
  meter: Meter;
  due: DueStatus;
  estimate: OdometerEstimate | null;
  /** 'call' when the interval call set the target; 'manufacturer' when only the manual's interval did. */
  target: 'call' | 'manufacturer';
  nextSampleOn: string | null;
  nextSampleOdometer: number | null;
  /** "due 7 weeks ago" when the date target has passed. */
  overdue: { days: number; words: string } | null;
}

function addDays(iso: string, days: number): string {
  return new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}

/** Everything on the crew home, for `today` (YYYY-MM-DD). */
export async function loadCrewHome(db: Kysely<Database>, crewId: string, today: string) {
  const [drawn, overdue, waiting, findings, machines, progress, steadyCount] = await Promise.all([
    listSamplesInState(db, crewId, 'drawn'),
    listOverdueShipments(db, crewId, addDays(today, -SHIPPED_OVERDUE_DAYS)),
    listSamplesInState(db, crewId, 'results_in'),
    listOpenFindings(db, crewId),
    listMachinesForDue(db, crewId),
    loadCrewProgress(db, crewId),
    countSteadyReviewQueue(db, crewId),
  ]);
  const waitingVerdicts = await listSampleVerdicts(
    db,
    crewId,
    waiting.map((s) => s.id),
  );
  const histories = await listOdometerHistory(
    db,
    machines.map((m) => m.id),
  );
  const due: DueMachine[] = [];
  for (const m of machines) {
    const estimate = estimateCurrentOdometer(histories.get(m.id) ?? [], today);
    const fromCall = m.next_sample_on !== null || m.next_sample_odometer !== null;
    // Without a call, the manufacturer's interval from the last oil change is the target.
    const nextSampleOn = fromCall
      ? m.next_sample_on
      : m.last_change_on && m.max_interval_days
        ? addDays(m.last_change_on, m.max_interval_days)
        : null;
    const nextSampleOdometer = fromCall
      ? m.next_sample_odometer === null
        ? null
        : Number(m.next_sample_odometer)
      : m.last_change_odometer !== null && m.max_interval_distance !== null
        ? Number(m.last_change_odometer) + Number(m.max_interval_distance)
        : null;
    const status = findSampleDue({ today, estimate, nextSampleOn, nextSampleOdometer });
    const late = nextSampleOn && status.reasons.includes('date') ? describeOverdue(nextSampleOn, today) : null;
    if (status.due)
      due.push({
        id: m.id,
        name: m.name,
        meter: m.meter,
        due: status,
        estimate,
        target: fromCall ? 'call' : 'manufacturer',
        nextSampleOn,
        nextSampleOdometer,
        overdue: late,
      });
  }
  // The longest overdue first; machines due by the meter estimate alone follow, by name.
  due.sort((a, b) => (b.overdue?.days ?? -1) - (a.overdue?.days ?? -1) || a.name.localeCompare(b.name));
  const cards = groupFindingsByMachine(findings, new Map(machines.map((m) => [m.id, m.call])));
  return { drawn, overdue, waiting, waitingVerdicts, steadyCount, cards, due, progress };
}
