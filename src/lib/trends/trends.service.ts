/** The wear chart's data for one machine of the crew: loads, then shapes with the pure functions of trends.ts. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { entityTagFromParts } from '../http/conditional-json';
import { findCrewMachine, findTrendDataFingerprint, listTrendOilChanges, listTrendSamples } from './trends.repository';
import { findGradeChanges, shapeTrendSeries, type TrendQuery, type TrendResponse } from './trends';

/** Trend series of a crew's machine, or null when the machine is not the crew's (the route answers 404). */
export async function loadMachineTrends(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  query: TrendQuery,
): Promise<TrendResponse | null> {
  const machine = await findCrewMachine(db, crewId, machineId);
  if (!machine) return null;
  const [samples, changes] = await Promise.all([
    listTrendSamples(db, machine, query.measurands),
    listTrendOilChanges(db, machine.id),
  ]);
  const series = shapeTrendSeries({ meter: machine.meter, samples, measurands: query.measurands, basis: query.basis });
  const notes: string[] = [];
  if (query.basis === 'rate') {
    notes.push(
      'Rates are ppm per 1,000 of distance on the oil (per 100 h on an hour meter), corrected for top-up oil. The correction is an approximation.',
    );
    if (series.some((s) => s.basis === 'ppm'))
      notes.push('Oil-condition figures have no rate and stay in their own unit.');
  }
  return {
    machine: { id: machine.id, name: machine.name, meter: machine.meter },
    basis: query.basis,
    x: query.x,
    series,
    gradeChanges: findGradeChanges(changes, machine.meter),
    notes,
  };
}

/**
 * The answer's format: part of its entity tag, so a release that changes what the chart is sent never lets a
 * browser keep an answer in the old format. Change it with trend-compact.ts or shapeTrendSeries.
 */
export const TREND_ANSWER_FORMAT = 'compact-2';

/**
 * The entity tag of the trend answer for this machine and query, from one cheap query instead of the answer's
 * (null when the machine is not the crew's: the answer itself then says 404). Nothing of the signed-in person goes
 * into the answer (units and meter are the machine's), so nothing of theirs goes into the tag.
 */
export async function findTrendEntityTag(
  db: Kysely<Database>,
  crewId: string,
  machineId: string,
  query: TrendQuery,
): Promise<string | null> {
  const fingerprint = await findTrendDataFingerprint(db, crewId, machineId, query.measurands);
  if (fingerprint === undefined) return null;
  return entityTagFromParts([TREND_ANSWER_FORMAT, machineId, fingerprint, JSON.stringify(query)]);
}
