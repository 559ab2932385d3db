/** Readings of a crew (or one of its machines) for export, with the worst stored finding level per reading. */
import { sql, type Kysely } from 'kysely';
import { getMeasurand, isMeasurandCode } from '../analysis';
import type { Database } from '../db/database';
import { levelRankSql } from '../levels.repository';
import type { MeterUnit } from '../units/units';
import type { ExportReading } from './readings-csv';

/** Every reading of the crew's machines (or of one machine), oldest sample first. */
export async function listExportReadings(
  db: Kysely<Database>,
  crewId: string,
  machineId?: string,
): Promise<ExportReading[]> {
  const { rows } = await sql<{
    machine_name: string;
    meter: MeterUnit;
    bottle_code: string;
    drawn_on: string;
    odometer: number;
    distance_on_oil: number | null;
    sae_grade: string | null;
    oil_product: string;
    state: string;
    measurand: string;
    qualifier: '<' | '>' | null;
    value: number;
    level: string | null;
  }>`
    select m.name as machine_name, m.meter, s.bottle_code, s.drawn_on::text as drawn_on, s.odometer, s.distance_on_oil, s.sae_grade, s.oil_product,
      s.state, r.measurand, r.qualifier, r.value,
      (select f.level from findings f where f.sample_id = s.id and f.measurand = r.measurand
        order by ${levelRankSql('f.level')} desc limit 1) as level
    from readings r
    join samples s on s.id = r.sample_id
    join machines m on m.id = s.machine_id
    where s.crew_id = ${crewId} ${machineId ? sql`and m.id = ${machineId}` : sql``}
    order by m.name, s.drawn_on, s.odometer, s.id, r.measurand
  `.execute(db);
  return rows.map((r) => ({
    machineName: r.machine_name,
    meter: r.meter,
    bottleCode: r.bottle_code,
    drawnOn: r.drawn_on,
    odometerStored: Number(r.odometer),
    distanceOnOilStored: r.distance_on_oil === null ? null : Number(r.distance_on_oil),
    grade: r.sae_grade,
    oilProduct: r.oil_product,
    state: r.state,
    measurand: r.measurand,
    qualifier: r.qualifier,
    value: Number(r.value),
    unit: isMeasurandCode(r.measurand) ? getMeasurand(r.measurand).unit : '',
    level: r.level ?? 'steady',
  }));
}
