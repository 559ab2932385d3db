// Shared by the decision benchmarks: the built app on its own database (or one already running, named by
// BENCH_BASE_URL and BENCH_DATABASE_URL), a signed-in session written straight into the sessions table, and a
// machine with a long invented history.
import { randomBytes, randomUUID } from 'node:crypto';
import type { Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { startApp, type RunningApp } from '../e2e/helpers/server';
// mulberry32: the same invented history on every run.
import { makeRandom } from '../unit/analysis/simulated-machines';
import { TYPICAL_USED_OIL } from './typical-oil';

export interface BenchApp {
  baseUrl: string;
  db: Kysely<Database>;
  /** One more app server over the same database with other settings (absent when measuring an app already running). */
  startAnotherServer?: RunningApp['startAnotherServer'];
  stop(): Promise<void>;
}

/** The app to measure: an already running one when BENCH_BASE_URL is set, else a fresh build on its own database. */
export async function openBenchApp(dbName: string): Promise<BenchApp> {
  if (process.env.BENCH_BASE_URL && process.env.BENCH_DATABASE_URL) {
    const db = createDb(process.env.BENCH_DATABASE_URL, { max: 4 });
    return { baseUrl: process.env.BENCH_BASE_URL, db, stop: () => db.destroy() };
  }
  const app = await startApp(dbName, { seed: false });
  const db = createDb(app.databaseUrl, { max: 4 });
  return {
    baseUrl: app.baseUrl,
    db,
    startAnotherServer: app.startAnotherServer,
    async stop() {
      await db.destroy();
      await app.stop();
    },
  };
}

// The measurands each bench sample carries (30 readings).
const TYPICAL = Object.fromEntries(
  Object.entries(TYPICAL_USED_OIL).filter(([code]) => code !== 'SUS210' && code !== 'INSOL'),
);

/** A mechanic of a new crew with a machine of `samples` samples (30 readings each, a finding on every tenth) and a session cookie. */
export async function seedBenchMachine(
  db: Kysely<Database>,
  samples: number,
): Promise<{ cookie: string; machineId: string; sampleId: string }> {
  const rand = makeRandom(7);
  const userId = randomUUID();
  await db
    .insertInto('users')
    .values({
      id: userId,
      email: `bench-${userId.slice(0, 8)}@bench.example`,
      display_name: 'Bench mechanic',
      password_hash: 'not-a-real-hash',
      email_verified_at: new Date(),
    })
    .execute();
  const crew = await db.insertInto('crews').values({ name: 'Bench crew' }).returning('id').executeTakeFirstOrThrow();
  await db.insertInto('crew_members').values({ crew_id: crew.id, user_id: userId, role: 'mechanic' }).execute();
  const machine = await db
    .insertInto('machines')
    .values({
      crew_id: crew.id,
      owner_user_id: userId,
      name: 'Bench 450',
      engine_layout: 'single',
      cooling: 'liquid',
      meter: 'km',
      oil_capacity_l: 1.2,
      recommended_grades: JSON.stringify([{ grade: '10W-40', minC: -10, maxC: 40 }]),
      max_interval_distance: 3000,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  let sampleId = '';
  const start = Date.UTC(2016, 0, 1);
  for (let i = 0; i < samples; i++) {
    const drawn = new Date(start + i * 14 * 86_400_000).toISOString().slice(0, 10);
    const oc = await db
      .insertInto('oil_changes')
      .values({
        crew_id: crew.id,
        machine_id: machine.id,
        changed_on: drawn,
        odometer: i * 1500,
        sae_grade: i % 50 === 49 ? '15W-50' : '10W-40',
        other_work: '[]',
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const code = `BENCH${String(i).padStart(5, '0')}${randomBytes(2).toString('hex')}`;
    const s = await db
      .insertInto('samples')
      .values({
        crew_id: crew.id,
        machine_id: machine.id,
        oil_change_id: oc.id,
        bottle_code: code,
        bottle_code_norm: code,
        drawn_on: drawn,
        odometer: i * 1500 + 1450,
        distance_on_oil: 1450,
        sae_grade: '10W-40',
        state: 'results_in',
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    sampleId = s.id;
    await db
      .insertInto('readings')
      .values(
        Object.entries(TYPICAL).map(([measurand, v]) => ({
          sample_id: s.id,
          measurand,
          value: Math.round(v * (0.8 + 0.4 * rand()) * 100) / 100,
          qualifier: null,
          lab_import_id: null,
        })),
      )
      .execute();
    if (i % 10 === 9)
      await db
        .insertInto('findings')
        .values({
          sample_id: s.id,
          measurand: 'Al',
          level: 'watch',
          rule_id: 'baseline-jump',
          numbers: '{}',
          sentence: 'Invented bench finding.',
        })
        .execute();
    await db
      .insertInto('interval_calls')
      .values({
        sample_id: s.id,
        machine_id: machine.id,
        call: 'hold',
        next_interval: 1500,
        next_sample_odometer: i * 1500 + 2950,
        next_sample_on: null,
        reasons: '[]',
        source: 'engine',
        made_by: null,
      })
      .execute();
  }
  const sessionId = randomBytes(20).toString('hex');
  await db
    .insertInto('sessions')
    .values({ id: sessionId, user_id: userId, expires_at: new Date(Date.now() + 86_400_000), current_crew_id: crew.id })
    .execute();
  return { cookie: `sumpwise_session=${sessionId}`, machineId: machine.id, sampleId };
}

/** The q-th quantile (0..1) of sorted numbers, nearest rank. */
export function quantile(sorted: readonly number[], q: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]!;
}
