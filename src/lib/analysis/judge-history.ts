/**
 * judgeHistory: the one replay entry point. Given a machine and its samples oldest first, it judges each sample
 * against the samples before it exactly as production does when that sample's results arrive (the lab import,
 * the recompute after a baseline change and the recompute of stored results all call replayHistory), so outside
 * checks can simulate machines and get the calls a rider would see.
 */
import { replayHistory, type Call } from './interval-call';
import type { Finding, FixedLimits, Level, MachineProfile, SamplePoint } from './types';

/**
 * The version of the decision engine. Stored findings and calls remember the version that made them; raise it
 * whenever a rule or threshold changes, and every machine's stored results are judged again.
 */
export const ENGINE_VERSION = '2026-12-03.dirt-aluminium-level';

export interface JudgedSample {
  sampleId: string;
  worst: Level;
  call: Call;
  nextIntervalDistance: number | null;
  findings: Finding[];
}

/** Findings, worst level and interval call of every sample of a machine, oldest first. */
export function judgeHistory(input: {
  machine: MachineProfile;
  samples: readonly SamplePoint[];
  limits?: Partial<FixedLimits>;
}): JudgedSample[] {
  return replayHistory(input).map((r) => ({
    sampleId: r.sampleId,
    worst: r.analysis.worst,
    call: r.call.call,
    nextIntervalDistance: r.call.nextIntervalDistance,
    findings: r.analysis.findings,
  }));
}
