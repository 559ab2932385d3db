/**
 * Judging a machine's samples and storing what the engine said: findings, the engine's interval calls and the
 * bands the rules used. One place for every caller: the lab import's confirm, a review's baseline choice, the
 * crew's own limits, and the re-judge after an engine upgrade (migrate:latest). Everything runs in the caller's
 * transaction, except recomputeStaleMachines, which opens one per machine.
 */
import type { Kysely, Transaction } from 'kysely';
import {
  CREW_REFERENCE,
  ENGINE_VERSION,
  crewReferenceLabel,
  isSameEngine,
  replaySteps,
  type ReplayedSample,
  type CrewReference,
  type CrewReferenceSample,
  type FixedLimits,
  type MachineProfile,
  type SamplePoint,
} from '../analysis';
import { isMeasurandCode, type MeasurandCode } from '../analysis/measurands';
import type { Database } from '../db/database';
import { fromStoredMeter, toStoredMeter, type MeterUnit } from '../units/units';
import { attachNewOil } from '../new-oil/new-oil';
import { loadNewOilLookup } from '../new-oil/new-oil.service';
import { canReadCrew } from '../auth/permissions';
import type { CrewMembership } from '../auth/types';
import { isUuid } from '../ids';
import { buildFindingsView, type FindingsView } from './findings-view';
import * as repo from './findings.repository';

type Db = Kysely<Database> | Transaction<Database>;

type SampleWithReadings = Awaited<ReturnType<typeof repo.findSamplesWithReadings>>[number];

/**
 * A stored sample as the analysis engine sees it. The engine works in the machine's own meter unit (its
 * sentences and rounding steps say mi, km or h), so stored kilometres are converted here and back below.
 */
function toSamplePoint(
  s: Omit<SampleWithReadings, 'created_at'>,
  readings: SamplePoint['readings'],
  oilCapacity: number | null,
  meter: MeterUnit,
): SamplePoint {
  return {
    id: s.id,
    takenAt: s.drawn_on,
    odometer: fromStoredMeter(s.odometer, meter),
    // Unknown distance stays NaN: the engine skips wear rates and intervals it cannot compute.
    distanceOnOil: s.distance_on_oil === null ? Number.NaN : fromStoredMeter(s.distance_on_oil, meter),
    topUpVolume: s.top_up_l,
    oilVolume: s.volume_l ?? oilCapacity ?? undefined,
    grade: s.sae_grade ?? undefined,
    oilProduct: s.oil_product || undefined,
    readings,
    baselineExcluded: s.in_baseline
      ? undefined
      : {
          reason: s.baseline_note || (s.break_in ? 'Break-in oil.' : 'No oil change on file for this sample.'),
          breakIn: s.break_in,
        },
    resultsOn: s.results_at ? new Date(s.results_at).toISOString().slice(0, 10) : undefined,
  };
}

type MachineProfileRow = NonNullable<Awaited<ReturnType<typeof repo.findMachineProfile>>>;

/** The same-engine machines of the crew (crew-scoped, archived ones left out), as isSameEngine decides. */
async function findSameEngineMachines(trx: Db, machine: MachineProfileRow) {
  const engine = {
    layout: machine.engine_layout,
    displacementCc: machine.displacement_cc === null ? null : Number(machine.displacement_cc),
    cooling: machine.cooling,
    sharedOil: machine.shared_oil,
    distanceUnit: machine.meter,
  };
  if (engine.displacementCc === null) return { engine, peers: [] };
  const candidates = await repo.findEngineCandidates(trx, machine.crew_id, machine.id, {
    layout: engine.layout,
    cooling: engine.cooling,
    sharedOil: engine.sharedOil,
  });
  const peers = candidates.filter((c) =>
    isSameEngine(engine, {
      layout: c.engine_layout,
      displacementCc: c.displacement_cc === null ? null : Number(c.displacement_cc),
      cooling: c.cooling,
      sharedOil: c.shared_oil,
      distanceUnit: c.meter,
    }),
  );
  return { engine, peers };
}

/**
 * The crew reference of a machine: the in-control samples of the crew's other machines with the same engine, in
 * this machine's distance unit, read in one query. Undefined with fewer than CREW_REFERENCE.params.minMachines such
 * machines (the engine also counts the machines that really give a value to each band).
 */
async function loadCrewReference(trx: Db, machine: MachineProfileRow): Promise<CrewReference | undefined> {
  const { engine, peers } = await findSameEngineMachines(trx, machine);
  const withSamples = peers.filter((p) => Number(p.samples_with_readings ?? 0) > 0);
  if (withSamples.length < CREW_REFERENCE.params.minMachines) return undefined;
  const rows = await repo.findReferenceSamples(
    trx,
    machine.crew_id,
    withSamples.map((p) => p.id),
  );
  const samples: CrewReferenceSample[] = [];
  for (const row of rows) {
    const readings: SamplePoint['readings'] = {};
    for (const [measurand, value, qualifier] of row.readings) {
      if (!isMeasurandCode(measurand)) continue;
      readings[measurand] =
        qualifier === '<' || qualifier === '>' ? { value: Number(value), qualifier } : { value: Number(value) };
    }
    const acted = new Set(row.acted.filter(isMeasurandCode));
    samples.push({
      ...toSamplePoint(row, readings, row.oil_capacity_l, machine.meter),
      machineId: row.machine_id,
      outOfBaseline: acted,
    });
  }
  return { label: crewReferenceLabel(engine), samples };
}

/**
 * A machine's samples change its same-engine peers' crew references. The peers still young enough to lean on one
 * (at most CREW_REFERENCE.params.rejudgeUpToSamples samples with readings) are judged again whole, in the caller's
 * transaction; older peers keep the judgements they got when their results arrived. Not recursive: a peer judged
 * again does not set off its own peers. Returns how many machines were judged again.
 */
export async function rejudgeEnginePeers(trx: Db, machineIds: ReadonlySet<string>): Promise<number> {
  const done = new Set(machineIds);
  let count = 0;
  for (const machineId of machineIds) {
    const machine = await repo.findMachineProfile(trx, machineId);
    if (!machine) continue;
    const { peers } = await findSameEngineMachines(trx, machine);
    for (const peer of peers) {
      const n = Number(peer.samples_with_readings ?? 0);
      if (done.has(peer.id) || n === 0 || n > CREW_REFERENCE.params.rejudgeUpToSamples) continue;
      done.add(peer.id);
      await recomputeMachineFindings(trx, peer.id, null);
      count++;
    }
  }
  return count;
}

const LIMIT_KEYS: Partial<Record<string, keyof FixedLimits>> = {
  Fe: 'Fe',
  Cr: 'Cr',
  Cu: 'Cu',
  Sn: 'Sn',
  Al: 'Al',
  Pb: 'Pb',
  B: 'B',
  Si: 'Si',
  FUEL: 'fuelPercent',
  WATER: 'waterPercent',
  KV100: 'kv100ChangePercent',
};

/**
 * Judge a machine's samples again with replayHistory (the same replay judgeHistory runs) and store the findings,
 * the engine's interval calls and the bands the rules used for `changed` samples and every later one (their
 * history includes the changed ones); `changed` null judges every sample. A machine last judged by another engine
 * version is judged whole. While its own baseline builds, bands come from the crew reference (loadCrewReference).
 * `known` holds readings already in memory by sample id. Returns the number of findings stored.
 */
export async function recomputeMachineFindings(
  trx: Db,
  machineId: string,
  changed: ReadonlySet<string> | null,
  known: ReadonlyMap<string, SamplePoint['readings']> = new Map(),
): Promise<number> {
  const machineRow = await repo.findMachineProfile(trx, machineId);
  if (!machineRow) return 0;
  const [samples, limitRows, newOil] = await Promise.all([
    repo.findSamplesWithReadings(trx, machineId),
    repo.findCrewLimits(trx, machineRow.crew_id),
    loadNewOilLookup(trx, machineRow.crew_id),
  ]);
  // Readings this import just wrote are in memory already; only the machine's earlier ones are read back.
  const readingRows = await repo.findReadingsOfSamples(
    trx,
    samples.filter((s) => !known.has(s.id)).map((s) => s.id),
  );
  const readingsBySample = new Map<string, SamplePoint['readings']>(known);
  for (const r of readingRows) {
    if (!isMeasurandCode(r.measurand)) continue;
    const map = readingsBySample.get(r.sample_id) ?? {};
    map[r.measurand as MeasurandCode] =
      r.qualifier === '<' || r.qualifier === '>' ? { value: r.value, qualifier: r.qualifier } : { value: r.value };
    readingsBySample.set(r.sample_id, map);
  }
  const limits: Partial<FixedLimits> = {};
  for (const l of limitRows) {
    const key = LIMIT_KEYS[l.measurand];
    if (key && l.act_at !== null) limits[key] = l.act_at;
  }
  const meter = machineRow.meter;
  const machine: MachineProfile = {
    cooling: machineRow.cooling,
    distanceUnit: meter,
    maxIntervalDistance:
      machineRow.max_interval_distance === null ? undefined : fromStoredMeter(machineRow.max_interval_distance, meter),
    maxIntervalDays: machineRow.max_interval_days ?? undefined,
    sharedOil: machineRow.shared_oil,
  };

  const stale = machineRow.judged_by !== ENGINE_VERSION;
  const firstChanged = stale || changed === null ? 0 : samples.findIndex((s) => changed.has(s.id));
  if (firstChanged === -1 || samples.length === 0) {
    if (stale) await repo.markMachineJudged(trx, machineId, ENGINE_VERSION);
    return 0;
  }
  const points = samples.map((s) =>
    attachNewOil(toSamplePoint(s, readingsBySample.get(s.id) ?? {}, machineRow.oil_capacity_l, meter), newOil),
  );
  machine.crewReference = await loadCrewReference(trx, machineRow);
  await repo.deleteJudgements(
    trx,
    samples.slice(firstChanged).map((s) => s.id),
  );
  // Each sample's analysis is turned into the rows to store as soon as it is judged, and the rows are written a
  // batch at a time: a machine of hundreds of samples never holds its analyses (the bulk of the replay's memory),
  // so a big import's analyses die young instead of piling up in the old generation of the heap.
  // One engine call per judged sample, so the batch's calls count its samples.
  // While PostgreSQL stores one batch (its constraint checks and indexes), the next one is judged: the replay
  // hands the event loop over between samples, so the batch's rows go out and PostgreSQL works on another core.
  // One batch is in flight at a time and every write is awaited before the machine is done; a failed write
  // fails the caller's transaction as before.
  let written = 0;
  let batch: JudgedRows = { findings: [], calls: [], bands: [] };
  let writing: Promise<void> | undefined;
  let inFlight = false;
  const writeBatch = async (): Promise<void> => {
    const rows = batch;
    batch = { findings: [], calls: [], bands: [] };
    await writing;
    inFlight = true;
    writing = writeJudgedRows(trx, rows)
      .then((n) => {
        written += n;
      })
      .finally(() => {
        inFlight = false;
      });
    // Awaited at the next batch or at the end; until then a rejection is not "unhandled".
    writing.catch(() => undefined);
  };
  let index = 0;
  for (const step of replaySteps({ machine, samples: points, limits })) {
    if (index++ < firstChanged) continue;
    addJudgedRows(batch, step, machineId, meter);
    if (batch.calls.length >= JUDGED_BATCH) await writeBatch();
    else if (inFlight) await yieldToIo();
  }
  if (batch.calls.length > 0) await writeBatch();
  await writing;
  if (stale) await repo.markMachineJudged(trx, machineId, ENGINE_VERSION);
  return written;
}

/**
 * Samples judged between writes in recomputeMachineFindings: their rows (about 40 small objects a sample) are a
 * fraction of the analyses they come from, and 300 statements for a 10,000-sample import cost little beside its
 * COPY work (tests/bench/import.bench.ts).
 */
export const JUDGED_BATCH = 100;

/** What recomputeMachineFindings stores for a run of judged samples. */
interface JudgedRows {
  findings: repo.FindingInsert[];
  calls: repo.IntervalCallInsert[];
  bands: repo.BandInsert[];
}

/** Store a run of judged samples' rows; returns the findings written. */
async function writeJudgedRows(trx: Db, rows: JudgedRows): Promise<number> {
  const findings = rows.findings.length > 0 ? await repo.insertFindings(trx, rows.findings) : 0;
  await repo.insertEngineCalls(trx, rows.calls);
  if (rows.bands.length > 0) await repo.insertBands(trx, rows.bands);
  return findings;
}

/** Let pending I/O (a batch's rows going out, PostgreSQL's answers) run before the next sample is judged. */
const yieldToIo = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

/** The findings, engine call and bands of one judged sample, added to `rows`. */
function addJudgedRows(rows: JudgedRows, step: ReplayedSample, machineId: string, meter: MeterUnit): void {
  const { sampleId, analysis, call } = step;
  for (const f of analysis.findings)
    rows.findings.push({
      sampleId,
      measurand: f.measurands[0] ?? null,
      level: f.level,
      ruleId: f.ruleId,
      numbers: f.numbers,
      sentence: f.sentence,
    });
  rows.calls.push({
    sampleId,
    machineId,
    call: call.call,
    // Back to the stored unit (km, or hours).
    nextInterval:
      call.nextIntervalDistance !== null && Number.isFinite(call.nextIntervalDistance)
        ? toStoredMeter(call.nextIntervalDistance, meter)
        : null,
    nextSampleOdometer:
      call.nextSampleDue.distance !== null && Number.isFinite(call.nextSampleDue.distance)
        ? toStoredMeter(call.nextSampleDue.distance, meter)
        : null,
    nextSampleOn: call.nextSampleDue.date ?? null,
    reasons: call.reasons,
  });
  for (const [measurand, band] of Object.entries(analysis.bands)) {
    if (!band || band.status !== 'ready') continue;
    rows.bands.push({
      sampleId,
      measurand,
      basis: band.basis,
      source: band.source,
      sourceLabel: band.crew?.label ?? null,
      sourceMachines: band.crew?.machines ?? null,
      n: band.n,
      mean: band.mean,
      lower: band.lower,
      watchAbove: band.watchAbove,
      actFrom: band.actFrom,
      toReported: band.toReported,
    });
  }
}

/**
 * Judge again every machine whose stored results an older engine version made: one transaction per machine
 * (the machine row locked, so an import at the same moment waits), oldest version first. Returns the count.
 */
export async function recomputeStaleMachines(db: Kysely<Database>, log?: (line: string) => void): Promise<number> {
  let after: string | null = null;
  let done = 0;
  for (;;) {
    const batch = await repo.listStaleMachines(db, ENGINE_VERSION, after, 200);
    if (batch.length === 0) break;
    for (const { id } of batch) {
      await db.transaction().execute(async (trx) => {
        const locked = await repo.lockMachine(trx, id);
        if (!locked || locked.judged_by === ENGINE_VERSION) return;
        await recomputeMachineFindings(trx, id, new Set());
      });
      done++;
    }
    after = batch[batch.length - 1]!.id;
  }
  if (done > 0) log?.(`[recompute] ${done} machine${done === 1 ? '' : 's'} judged again with engine ${ENGINE_VERSION}`);
  return done;
}

/** A sample whose readings changed, with its machine. */
export interface ChangedSample {
  sampleId: string;
  machineId: string;
}

/**
 * Judge the machines of changed samples again (each from its first changed sample on) and then the young
 * same-engine peers whose crew references they change, in the caller's transaction. `known` holds readings already
 * in memory by sample id (the lab import's); a machine's entries are dropped from it once the machine is judged,
 * so a big import holds fewer of them as it goes. Returns the number of findings stored for those machines.
 */
export async function recomputeChangedSamples(
  trx: Db,
  changed: Iterable<ChangedSample>,
  known: Map<string, SamplePoint['readings']> = new Map(),
): Promise<number> {
  const byMachine = new Map<string, Set<string>>();
  for (const { sampleId, machineId } of changed) {
    const set = byMachine.get(machineId) ?? new Set<string>();
    set.add(sampleId);
    byMachine.set(machineId, set);
  }
  let written = 0;
  for (const [machineId, ids] of byMachine) {
    written += await recomputeMachineFindings(trx, machineId, ids, known);
    for (const id of ids) known.delete(id);
  }
  // Their crew references changed with these samples: judge the young machines of the same engines again.
  await rejudgeEnginePeers(trx, new Set(byMachine.keys()));
  return written;
}

/** Recompute findings and the engine interval call of one sample (and the later samples of its machine). */
export async function recomputeFindings(trx: Db, sampleId: string): Promise<number> {
  const machine = await repo.findMachineOfSample(trx, sampleId);
  if (!machine) return 0;
  return recomputeChangedSamples(trx, [{ sampleId, machineId: machine.id }]);
}

/** How a sample's findings were made, for a member of its crew; null for another crew's or an unknown sample. */
export async function loadFindingsView(
  db: Kysely<Database>,
  crew: CrewMembership | null,
  sampleId: string,
): Promise<FindingsView | null> {
  if (!canReadCrew(crew) || !isUuid(sampleId)) return null;
  const sample = await repo.findFindingsSample(db, crew.crewId, sampleId);
  if (!sample) return null;
  const [readings, findings, bands] = await Promise.all([
    repo.findReadingsOfSample(db, sampleId),
    repo.findFindingsOfSample(db, sampleId),
    repo.findBandsOfSample(db, sampleId),
  ]);
  return buildFindingsView({ sample, readings, findings, bands });
}
