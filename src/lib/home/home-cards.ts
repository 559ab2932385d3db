/** How the crew home groups its lists: one card per machine with findings, first steps for a new crew. Pure. */
import type { IntervalCallKind, Level, Role } from '../db/database';
import { canImportLabReport } from '../auth/permissions';
import { levelRank } from '../levels';

export interface OpenFinding {
  sample_id: string;
  bottle_code: string;
  drawn_on: string;
  machine_id: string;
  machine_name: string;
  level: Level;
  rule_id: string;
  measurand: string | null;
  sentence: string;
}

export interface MachineCard {
  machineId: string;
  machineName: string;
  sampleId: string;
  bottleCode: string;
  drawnOn: string;
  worst: Level;
  /** The worst finding: the one the card's sentence is about. */
  main: OpenFinding;
  /** How many findings the latest sample has in all (the main one included). */
  count: number;
  call: IntervalCallKind | null;
}

/**
 * One card per machine from the open findings of each machine's latest sample: the worst level first, then the
 * most recent sample, then the name. Within a machine the main finding is the worst, ties by the order given.
 */
export function groupFindingsByMachine(
  findings: readonly OpenFinding[],
  calls: ReadonlyMap<string, IntervalCallKind | null>,
): MachineCard[] {
  const byMachine = new Map<string, MachineCard>();
  for (const f of findings) {
    const card = byMachine.get(f.machine_id);
    if (!card) {
      byMachine.set(f.machine_id, {
        machineId: f.machine_id,
        machineName: f.machine_name,
        sampleId: f.sample_id,
        bottleCode: f.bottle_code,
        drawnOn: f.drawn_on,
        worst: f.level,
        main: f,
        count: 1,
        call: calls.get(f.machine_id) ?? null,
      });
      continue;
    }
    card.count += 1;
    if (levelRank(f.level) > levelRank(card.worst)) {
      card.worst = f.level;
      card.main = f;
    }
  }
  return [...byMachine.values()].sort(
    (a, b) =>
      levelRank(b.worst) - levelRank(a.worst) ||
      b.drawnOn.localeCompare(a.drawnOn) ||
      a.machineName.localeCompare(b.machineName),
  );
}

export interface CrewProgress {
  machines: number;
  machinesWithOilChange: number;
  drainCards: number;
  /** Samples with lab results in (reviewed or not). */
  samplesWithResults: number;
  /** Mechanics in the crew plus invitations still open (not accepted, not withdrawn, not expired). */
  mechanicsOrInvites: number;
  /** The first machine, to link its oil-change and drain-card forms. */
  firstMachineId: string | null;
  firstMachineWithOilChangeId: string | null;
}

export interface FirstStep {
  key: 'machine' | 'oil-change' | 'drain-card' | 'import' | 'invite';
  label: string;
  href: string;
  done: boolean;
}

/**
 * The first steps a new crew takes, each ticked when done; null once the crew has a machine with a logged oil
 * change, a drain card and, for those who import, the lab's first results (the home then shows only what needs
 * doing). The import step is for leads and mechanics, the invitation step is the lead's alone.
 */
export function firstSteps(p: CrewProgress, role: Role, crewId: string): FirstStep[] | null {
  const imports = canImportLabReport({ crewId, crewName: '', role });
  if (p.machinesWithOilChange > 0 && p.drainCards > 0 && (p.samplesWithResults > 0 || !imports)) return null;
  const machineHref = (m: string | null, path: string) => (m ? `/machines/${m}/${path}` : '/machines/new');
  const steps: FirstStep[] = [
    { key: 'machine', label: 'Add a machine', href: '/machines/new', done: p.machines > 0 },
    {
      key: 'oil-change',
      label: 'Log its last oil change',
      href: machineHref(p.firstMachineId, 'oil-change'),
      done: p.machinesWithOilChange > 0,
    },
    {
      key: 'drain-card',
      label: 'Fill a drain card at the next oil change',
      href: machineHref(p.firstMachineWithOilChangeId ?? p.firstMachineId, 'drain-card'),
      done: p.drainCards > 0,
    },
  ];
  if (imports)
    steps.push({
      key: 'import',
      label: 'Import the lab’s results',
      href: '/imports',
      done: p.samplesWithResults > 0,
    });
  if (role === 'lead')
    steps.push({
      key: 'invite',
      label: 'Invite a mechanic',
      href: `/crews/${crewId}#invite-h`,
      done: p.mechanicsOrInvites > 0,
    });
  return steps;
}
