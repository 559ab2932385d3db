/**
 * The reminder run (scheduled in the worker; tests call it with a simulated `now`): next sample due,
 * shipped bottles without results after 21 days, invitations not accepted after 7 days. Each machine,
 * sample or invitation is its own transaction, so one bad row cannot hold back the others; each recipient's
 * reminder has a dedupe key, so a run repeated the same hour, the next day or after a crash sends nothing again.
 */
import type { Kysely } from 'kysely';
import { deliverAlerts, loadAlertEnv } from '../alerts/alerts.service';
import { formatUtcDay, type AlertEnv, type AlertOutcome } from '../alerts/alerts';
import { composeInvitationPendingAlert, composeSampleDueAlert, composeShippedOverdueAlert } from '../alerts/alert-mail';
import { listCrewRecipients } from '../alerts/alerts.repository';
import type { Database } from '../db/database';
import { estimateCurrentOdometer, findSampleDue } from '../home/odometer-estimate';
import { listOdometerHistory } from '../overview/overview.repository';
import {
  INVITATION_PENDING_DAYS,
  INVITATION_REMINDER_HORIZON_DAYS,
  SHIPPED_OVERDUE_DAYS,
  addDays,
  buildInvitationKey,
  buildSampleDueKey,
  buildShippedOverdueKey,
  checkInvitationPending,
  checkShippedOverdue,
  deriveSampleTarget,
} from './reminder-rules';
import { listMachinesForDueCheck, listPendingInvitations, listShippedSamples } from './reminders.repository';

/** How many recipients each reminder reached, by outcome. */
export type ReminderReport = Record<
  'sampleDue' | 'shippedOverdue' | 'invitationPending',
  Partial<Record<AlertOutcome, number>>
>;

/** Runs every reminder as of `now`; returns the outcomes counted by kind. */
export async function runReminders(
  db: Kysely<Database>,
  options: { now: Date; env?: AlertEnv },
): Promise<ReminderReport> {
  const env = options.env ?? loadAlertEnv();
  return {
    sampleDue: await runSampleDueReminders(db, options.now, env),
    shippedOverdue: await runShippedOverdueReminders(db, options.now, env),
    invitationPending: await runInvitationReminders(db, options.now, env),
  };
}

/** Machines whose next sample is due by date or by estimated odometer, and that have no bottle on its way. */
export async function runSampleDueReminders(
  db: Kysely<Database>,
  now: Date,
  env: AlertEnv,
): Promise<Partial<Record<AlertOutcome, number>>> {
  const today = formatUtcDay(now);
  const counts: Partial<Record<AlertOutcome, number>> = {};
  const machines = (await listMachinesForDueCheck(db)).filter((m) => !m.has_open_sample);
  const histories = await listOdometerHistory(
    db,
    machines.map((m) => m.id),
  );
  for (const m of machines) {
    const target = deriveSampleTarget({
      nextSampleOn: m.next_sample_on,
      nextSampleOdometer: m.next_sample_odometer,
      lastChangeOn: m.last_change_on,
      lastChangeOdometer: m.last_change_odometer,
      maxIntervalDays: m.max_interval_days,
      maxIntervalDistance: m.max_interval_distance,
    });
    if (!target) continue;
    // Readings after `today` (a simulated clock in the past) are not known yet at that time.
    const history = (histories.get(m.id) ?? []).filter((p) => p.date <= today);
    const estimate = estimateCurrentOdometer(history, today);
    const due = findSampleDue({
      today,
      estimate,
      nextSampleOn: target.nextSampleOn,
      nextSampleOdometer: target.nextSampleOdometer,
    });
    if (!due.due) continue;
    const outcomes = await db.transaction().execute(async (trx) => {
      const recipients = await listCrewRecipients(trx, m.crew_id, ['mechanic', 'lead'], [m.owner_user_id]);
      return deliverAlerts(trx, env, {
        crewId: m.crew_id,
        crewName: m.crew_name,
        kind: 'sample_due',
        alerts: recipients.map((recipient) => ({
          recipient,
          dedupeKey: buildSampleDueKey(m.id, target, recipient.user_id),
          content: composeSampleDueAlert({
            crewName: m.crew_name,
            machineName: m.name,
            machineUrl: `${env.publicUrl}/machines/${m.id}`,
            drainCardUrl: `${env.publicUrl}/machines/${m.id}/drain-card`,
            meter: m.meter,
            reasons: due.reasons,
            nextSampleOn: target.nextSampleOn,
            nextSampleOdometer: target.nextSampleOdometer,
            estimatedOdometer: estimate?.odometer ?? null,
          }),
        })),
      });
    });
    tally(counts, outcomes);
  }
  return counts;
}

/** Bottles shipped at least 21 days ago with no results yet. */
export async function runShippedOverdueReminders(
  db: Kysely<Database>,
  now: Date,
  env: AlertEnv,
): Promise<Partial<Record<AlertOutcome, number>>> {
  const today = formatUtcDay(now);
  const counts: Partial<Record<AlertOutcome, number>> = {};
  for (const s of await listShippedSamples(db, addDays(today, -SHIPPED_OVERDUE_DAYS))) {
    const { overdue, daysWaiting } = checkShippedOverdue(s.shipped_on, today, SHIPPED_OVERDUE_DAYS);
    if (!overdue) continue;
    const outcomes = await db.transaction().execute(async (trx) => {
      const recipients = await listCrewRecipients(trx, s.crew_id, ['mechanic', 'lead'], [s.owner_user_id]);
      return deliverAlerts(trx, env, {
        crewId: s.crew_id,
        crewName: s.crew_name,
        kind: 'shipped_overdue',
        alerts: recipients.map((recipient) => ({
          recipient,
          dedupeKey: buildShippedOverdueKey(s.id, recipient.user_id),
          content: composeShippedOverdueAlert({
            crewName: s.crew_name,
            machineName: s.machine_name,
            bottleCode: s.bottle_code,
            shippedOn: s.shipped_on,
            days: daysWaiting,
            sampleUrl: `${env.publicUrl}/samples/${s.id}`,
          }),
        })),
      });
    });
    tally(counts, outcomes);
  }
  return counts;
}

/** Invitations not accepted after 7 days: the crew's leads hear about them once. */
export async function runInvitationReminders(
  db: Kysely<Database>,
  now: Date,
  env: AlertEnv,
): Promise<Partial<Record<AlertOutcome, number>>> {
  const counts: Partial<Record<AlertOutcome, number>> = {};
  const after = new Date(now.getTime() - INVITATION_REMINDER_HORIZON_DAYS * 86_400_000);
  const before = new Date(now.getTime() - INVITATION_PENDING_DAYS * 86_400_000);
  for (const inv of await listPendingInvitations(db, after, before)) {
    const { pending, daysWaiting } = checkInvitationPending(
      inv.created_at,
      now,
      INVITATION_PENDING_DAYS,
      INVITATION_REMINDER_HORIZON_DAYS,
    );
    if (!pending) continue;
    const outcomes = await db.transaction().execute(async (trx) => {
      const leads = await listCrewRecipients(trx, inv.crew_id, ['lead']);
      return deliverAlerts(trx, env, {
        crewId: inv.crew_id,
        crewName: inv.crew_name,
        kind: 'invitation_pending',
        alerts: leads.map((recipient) => ({
          recipient,
          dedupeKey: buildInvitationKey(inv.id, recipient.user_id),
          content: composeInvitationPendingAlert({
            crewName: inv.crew_name,
            email: inv.email,
            invitedOn: formatUtcDay(inv.created_at),
            days: daysWaiting,
            crewUrl: `${env.publicUrl}/crews/${inv.crew_id}`,
            expired: inv.expires_at.getTime() <= now.getTime(),
          }),
        })),
      });
    });
    tally(counts, outcomes);
  }
  return counts;
}

function tally(counts: Partial<Record<AlertOutcome, number>>, outcomes: readonly AlertOutcome[]): void {
  for (const o of outcomes) counts[o] = (counts[o] ?? 0) + 1;
}
