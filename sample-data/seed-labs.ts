// Demo lab reports (invented): for the crews' machines and the samples their drain cards registered, the
// results of invented labs in the three invented layouts, imported through the same service a rider's
// upload goes through. Every ppm level here is invented for the demo, chosen to look like a healthy
// motorcycle engine except where a machine's story says otherwise.
import type { Kysely, Transaction } from 'kysely';
import { findGradeWindow } from '../src/lib/analysis/viscosity';
import type { Database } from '../src/lib/db/database';
import type { LabReadings } from '../src/lib/lab-csv/lab-csv';
import {
  formatLabCsv,
  LAB_CSV_LAYOUTS,
  LAB_NAMES,
  type LabCsvLayout,
  type LabReportRow,
} from '../src/lib/lab-csv/lab-csv-layouts';
import { confirmLabImport, storeLabFile } from '../src/lib/lab-import/lab-import.service';
import { recomputeMachineFindings } from '../src/lib/findings/findings.service';

type Db = Kysely<Database> | Transaction<Database>;

/** The story a machine's oil tells (PRODUCT.md, demo scenario). */
export type LabStory = 'aluminium-climbing' | 'silicon-spike' | 'coolant-markers' | 'fuel-dilution' | 'stable';

interface MachineFacts {
  displacementCc: number | null;
  cooling: 'air' | 'oil' | 'liquid';
  onlyMachineOfCrew: boolean;
}

/** Which story a machine gets, from its attributes: the solo rider's bike is the stable one. */
export function pickLabStory(m: MachineFacts): LabStory {
  if (m.onlyMachineOfCrew) return 'stable';
  const cc = m.displacementCc ?? 0;
  if (cc >= 1000 && m.cooling === 'liquid') return 'coolant-markers';
  if (cc >= 600 && cc < 670 && m.cooling === 'air') return 'fuel-dilution';
  if (cc >= 670 && cc < 800) return 'silicon-spike';
  if (cc >= 400 && cc < 500) return 'aluminium-climbing';
  return 'stable';
}

/** A small fixed wobble so the figures look measured without leaving the machine's own band. */
const WOBBLE = [0, 1, -1, 0, 1, 0, -1, 1, 0, -1];

const lt = (value: number) => ({ value, qualifier: '<' as const });

/** Invented readings of sample `i` of `n` with results, for a machine with this story and grade. */
export function inventReadings(story: LabStory, i: number, n: number, grade: string | null): LabReadings {
  const w = WOBBLE[i % WOBBLE.length] ?? 0;
  const window = grade ? findGradeWindow(grade) : null;
  // New-oil viscosity a little above the middle of the grade's SAE J300 window (13.2 mm²/s for a 40).
  const kv100 =
    window && Number.isFinite(window.max) ? Math.round(((window.min + window.max) / 2 - 0.2) * 10) / 10 : 13.2;
  const r: LabReadings = {
    Fe: { value: 22 + w },
    Al: { value: 4 },
    Cr: { value: 1 },
    Cu: { value: 5 + (w > 0 ? 1 : 0) },
    Pb: { value: 2 },
    Sn: lt(1),
    Ni: lt(1),
    Ag: lt(0),
    Ti: lt(0),
    V: lt(0),
    Mn: { value: 1 },
    Si: { value: 8 + w },
    Na: { value: 3 },
    K: lt(1),
    B: { value: 3 },
    Mo: { value: 55 },
    Zn: { value: 1020 + 10 * w },
    P: { value: 930 + 8 * w },
    Ca: { value: 2300 + 20 * w },
    Mg: { value: 16 },
    Ba: lt(1),
    S: { value: 2400 },
    KV40: { value: Math.round(kv100 * 6.9 * 10) / 10 },
    KV100: { value: kv100 },
    VI: { value: 146 },
    TBN: { value: 7.2 },
    TAN: { value: 2.1 },
    FUEL: { value: 0.4 },
    WATER: lt(0.05),
    GLYCOL: { value: 0 },
    FLASH: { value: 215 },
    INSOL: { value: 0.3 },
  };
  const fromEnd = n - 1 - i; // 0 for the newest sample with results.
  switch (story) {
    case 'aluminium-climbing': {
      // Piston or bore wear starting: aluminium up over the last four samples, iron following a little.
      const al = [16, 12, 9, 6][fromEnd];
      if (al !== undefined) {
        r.Al = { value: al };
        r.Fe = { value: 22 + (3 - fromEnd) * 2 };
      }
      break;
    }
    case 'silicon-spike':
      // A dusty week (third newest), then a new air filter: silicon back down over the next two.
      if (fromEnd === 2) Object.assign(r, { Si: { value: 48 }, Al: { value: 9 }, Fe: { value: 31 } });
      if (fromEnd === 1) r.Si = { value: 13 };
      if (fromEnd === 0) r.Si = { value: 9 };
      break;
    case 'coolant-markers': {
      // A weeping water-pump seal: sodium and potassium up, boron climbing, over the last three samples.
      const step = 3 - fromEnd;
      if (step >= 1) {
        r.Na = { value: [38, 61, 86][step - 1]! };
        r.K = { value: [9, 16, 24][step - 1]! };
        r.B = { value: [14, 26, 41][step - 1]! };
      }
      break;
    }
    case 'fuel-dilution': {
      // Short winter trips: fuel in the oil, viscosity and flash point falling, over the last three samples.
      const step = 3 - fromEnd;
      if (step >= 1) {
        const thin = [0.9, 0.8, 0.7][step - 1]!;
        r.FUEL = { value: [2.8, 4.6, 6.2][step - 1]! };
        r.KV100 = { value: Math.round(kv100 * thin * 10) / 10 };
        r.KV40 = { value: Math.round(kv100 * thin * 6.9 * 10) / 10 };
        r.FLASH = { value: [192, 176, 163][step - 1]! };
      }
      break;
    }
    case 'stable':
      break;
  }
  return r;
}

function addDays(iso: string, days: number): string {
  return new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}

function slug(text: string): string {
  return text
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-|-$/g, '');
}

export interface SeededLabReports {
  files: number;
  samples: number;
  readings: number;
  /** The sample left without results so the home page has a bottle on its way. */
  waitingSampleId: string | null;
}

/**
 * For each crew: invent the results of every sample its drain cards registered (but the newest sample of
 * one machine), write them as the invented labs' files (three layouts, consecutive stretches of time), and
 * import each file through storeLabFile + confirmLabImport.
 */
export async function seedLabReports(
  db: Db,
  options: { crewIds: string[]; userId: string },
): Promise<SeededLabReports> {
  const out: SeededLabReports = { files: 0, samples: 0, readings: 0, waitingSampleId: null };
  for (const crewId of options.crewIds) {
    const machines = await db
      .selectFrom('machines')
      .select(['id', 'displacement_cc', 'cooling'])
      .where('crew_id', '=', crewId)
      .orderBy('created_at')
      .execute();
    const samples = await db
      .selectFrom('samples')
      .select(['id', 'machine_id', 'bottle_code', 'drawn_on', 'sae_grade'])
      .where('crew_id', '=', crewId)
      .where((eb) =>
        eb.not(
          eb.exists(eb.selectFrom('readings').select('sample_id').whereRef('readings.sample_id', '=', 'samples.id')),
        ),
      )
      .orderBy('drawn_on')
      .orderBy('odometer')
      .execute();

    const rows: (LabReportRow & { drawnOn: string })[] = [];
    for (const machine of machines) {
      const story = pickLabStory({
        displacementCc: machine.displacement_cc,
        cooling: machine.cooling,
        onlyMachineOfCrew: machines.length === 1,
      });
      let own = samples.filter((s) => s.machine_id === machine.id);
      // The air-cooled single's newest bottle is still on its way to the lab.
      if (story === 'fuel-dilution' && out.waitingSampleId === null && own.length > 1) {
        out.waitingSampleId = own.at(-1)!.id;
        own = own.slice(0, -1);
      }
      own.forEach((s, i) => {
        rows.push({
          bottle: s.bottle_code,
          sampled: s.drawn_on,
          reported: addDays(s.drawn_on, 8),
          readings: inventReadings(story, i, own.length, s.sae_grade),
          drawnOn: s.drawn_on,
        });
      });
    }
    if (rows.length === 0) continue;
    rows.sort((a, b) => a.drawnOn.localeCompare(b.drawnOn));

    // The crew sent its bottles to three labs over time: three consecutive stretches, one layout each.
    const parts = Math.min(LAB_CSV_LAYOUTS.length, rows.length);
    for (let p = 0; p < parts; p += 1) {
      const slice = rows.slice(Math.floor((p * rows.length) / parts), Math.floor(((p + 1) * rows.length) / parts));
      if (slice.length === 0) continue;
      const layout: LabCsvLayout = LAB_CSV_LAYOUTS[p]!;
      const text = formatLabCsv(
        layout,
        slice.map(({ drawnOn: _d, ...row }) => row),
      );
      const ext = layout === 'units-row-saybolt' ? 'tsv' : 'csv';
      const fileName = `${slug(LAB_NAMES[layout])}-${slice[0]!.drawnOn}.${ext}`;
      const stored = await storeLabFile(db, {
        crewId,
        userId: options.userId,
        fileName,
        bytes: new TextEncoder().encode(text),
      });
      if (!stored.ok) throw new Error(`demo lab file ${fileName}: ${stored.message}`);
      const confirmed = await confirmLabImport(db, {
        crewId,
        userId: options.userId,
        labFileId: stored.value.labFileId,
        decisions: {},
      });
      if (!confirmed.ok) {
        throw new Error(
          `demo lab file ${fileName}: ${confirmed.message} ${Object.values(confirmed.fields ?? {})
            .slice(0, 3)
            .join(' ')}`,
        );
      }
      out.files += 1;
      out.samples += confirmed.value.samplesWritten;
      out.readings += confirmed.value.readingsWritten;
      // The lab's results arrived about when it reported them (never later than today), not all on seed day:
      // "next sample by" dates count from that day.
      const arrived = slice.reduce(
        (latest, r) => ((r.reported ?? r.drawnOn) > latest ? (r.reported ?? r.drawnOn) : latest),
        '',
      );
      const today = new Date().toISOString().slice(0, 10);
      await db
        .updateTable('lab_imports')
        .set({ confirmed_at: new Date(`${arrived < today ? arrived : today}T12:00:00Z`) })
        .where('id', '=', confirmed.value.importId)
        .execute();
    }
    // Judge the crew's machines again now the arrival days are known (the same replay the import ran).
    for (const machine of machines) {
      await db.updateTable('machines').set({ judged_by: null }).where('id', '=', machine.id).execute();
      await recomputeMachineFindings(db, machine.id, new Set());
    }
  }
  return out;
}
