/** Saving a crew's alert limits: one transaction that writes them, records the change and judges every machine again. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { canEditLimits } from '../auth/permissions';
import type { Actor, CrewMembership } from '../auth/types';
import { refuse, refuseForbidden, succeed, type Result } from '../http/result';
import { recordAuditEvent } from '../audit/audit.repository';
import { recomputeMachineFindings } from '../findings/findings.service';
import { LIMIT_FIELDS, type LimitValues } from './crew-limits';
import { listCrewLimits, listCrewMachineSamples, lockCrewLimits, writeCrewLimit } from './crew-limits.repository';

/** How many limits changed, and how many machines were judged again because of them. */
export interface SavedLimits {
  changed: number;
  machinesJudged: number;
}

/** The change in words for the crew's log ("Iron: 100 → 80 ppm; Water: 0.05 → default"). */
export function describeChanges(
  changes: readonly { measurand: string; from: number | null; to: number | null }[],
): string {
  return changes
    .map((c) => {
      const f = LIMIT_FIELDS.find((x) => x.measurand === c.measurand)!;
      const word = (v: number | null) => (v === null ? `default ${f.defaultValue}` : String(v));
      return `${f.label}: ${word(c.from)} → ${word(c.to)} ${f.unit}`;
    })
    .join('; ');
}

/** The crew's limits as stored (for the form). */
export async function loadCrewLimits(db: Kysely<Database>, membership: CrewMembership) {
  return listCrewLimits(db, membership.crewId);
}

/**
 * A lead saves the crew's alert limits. Unchanged values write nothing; when anything changed, the change is in
 * the audit log and every machine of the crew is judged again with the new limits, all in one transaction, so the
 * stored findings and interval calls never disagree with the limits on this page.
 */
export async function saveCrewLimits(
  db: Kysely<Database>,
  actor: Actor<CrewMembership | null>,
  values: LimitValues,
  meta: { ip: string | null },
): Promise<Result<SavedLimits>> {
  if (!actor.membership) return refuse(404, 'not_found', 'No such crew.');
  if (!canEditLimits(actor.membership)) return refuseForbidden('Only a lead of this crew changes its alert limits.');
  const crewId = actor.membership.crewId;
  return db.transaction().execute(async (trx) => {
    const before = new Map((await lockCrewLimits(trx, crewId)).map((r) => [r.measurand, r.act_at]));
    const changes: { measurand: string; from: number | null; to: number | null }[] = [];
    for (const f of LIMIT_FIELDS) {
      const next = values[f.measurand] ?? null;
      // Typing the default is the same as leaving the box empty: no row, so a later change of default applies.
      const to = next !== null && next === f.defaultValue ? null : next;
      const from = before.get(f.measurand) ?? null;
      if (from === to) continue;
      await writeCrewLimit(trx, crewId, f.measurand, to, actor.userId);
      changes.push({ measurand: f.measurand, from, to });
    }
    if (changes.length === 0) return succeed({ changed: 0, machinesJudged: 0 });
    await recordAuditEvent(trx, {
      kind: 'alert_limits_changed',
      crewId,
      actorUserId: actor.userId,
      ip: meta.ip,
      detail: { limits: describeChanges(changes) },
    });
    const machines = await listCrewMachineSamples(trx, crewId);
    let judged = 0;
    for (const [machineId, sampleIds] of machines) {
      if (sampleIds.length === 0) continue;
      await recomputeMachineFindings(trx, machineId, new Set(sampleIds));
      judged += 1;
    }
    return succeed({ changed: changes.length, machinesJudged: judged });
  });
}
