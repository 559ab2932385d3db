/**
 * Simulated motorcycle engines for the false-alarm and detection checks of the decision engine. Shared by
 * the simulation test (tests/unit/analysis/simulation.test.ts) and the benchmark (tests/bench/simulation.bench.ts).
 *
 * Noise model (written down so the figures can be reproduced and argued with):
 * - A seeded generator (mulberry32) and the Box–Muller transform give every random number; the same seed gives
 *   the same machines on every run and every engine.
 * - Each machine runs a nominal oil change interval drawn between 3,000 and 5,000 km; every interval varies
 *   uniformly by ±15 % around it. One sample is drawn at each oil change (at drain), so its distance on oil is
 *   that interval. About 30–80 km a day, so dates follow the odometer; results arrive 7–40 days after the draw.
 * - Wear: each wear metal and contaminant has a constant true rate in ppm per 1,000 km, drawn per machine
 *   (Fe 3–8, Al 0.5–1.5, Cr 0.1–0.4, Cu 0.5–2, Pb 0.2–0.8, Sn and Ni 0–0.2, Si 0.5–1.5 from dirt plus 3 ppm
 *   of antifoam); the true ppm is rate × distance on oil (+ the oil's own content for Si, Na, B).
 * - The oil's own elements are constant per machine (one oil product for life): Na 2–6 ppm, K 0 ppm, B 2–60 ppm
 *   (some oils carry borate), Mo 0–80, Zn 900–1,200, P 800–1,000, Ca 1,800–2,600, Mg 10–30 ppm.
 * - Lab scatter: each machine's lab has a relative standard deviation drawn between 15 % and 20 % for wear metals
 *   and contaminants (the order of ICP wear-metal reproducibility), and 8 % for the additive elements, which sit at
 *   hundreds of ppm where ICP is relatively tighter (from memory); each reported ppm is true × (1 + rsd · z),
 *   z standard normal, rounded to a whole ppm; below 1 ppm the lab reports "<1".
 * - Oil condition: KV100 new 14.0 mm²/s sheared 3–6 % with 2 % scatter, fuel 0.3–0.9 % (absolute scatter 0.15),
 *   water "<0.05" %, flash point 215 ± 5 °C, TBN 6–8 and TAN 1.5–2.5 mg KOH/g, each with its own scatter.
 * - Wearing machines: from sample 8 (1-based) on, the iron rate doubles, or the aluminium rate triples.
 */
import type { CrewReferenceSample, MachineProfile, SamplePoint } from '~/lib/analysis/types';
import type { MeasurandCode } from '~/lib/analysis/measurands';

export type Scenario = 'stable' | 'iron-x2' | 'aluminium-x3';

export interface SimulatedMachine {
  machine: MachineProfile;
  samples: SamplePoint[];
}

/** What an engine said about one sample, reduced to what the checks count. */
export interface JudgedSample {
  call: string;
  findings: { level: 'watch' | 'act'; measurands: readonly string[] }[];
}

/** mulberry32: a small seeded generator. */
export function makeRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeNormal(random: () => number): () => number {
  return () => {
    const u = Math.max(random(), 1e-12);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
  };
}

const DAY_MS = 86_400_000;
export const SAMPLES_PER_MACHINE = 12;
/** How far one machine's wear rates sit from its engine's, either way, in the crew simulation. */
export const ENGINE_SPREAD = 0.25;
/** The 1-based sample from which a wearing machine wears faster. */
export const CHANGE_FROM_SAMPLE = 8;

/** One simulated machine of a scenario, from its own seed. */
export function simulateMachine(
  seed: number,
  scenario: Scenario,
  options: { oilSeed?: number; engineSeed?: number } = {},
): SimulatedMachine {
  const random = makeRandom(seed);
  const normal = makeNormal(random);
  const between = (a: number, b: number) => a + (b - a) * random();
  const rsd = between(0.15, 0.2);
  const nominal = between(3000, 5000);
  const pace = between(30, 80);
  const cooling = random() < 0.5 ? 'air' : 'liquid';
  const rates: Partial<Record<MeasurandCode, number>> = {
    Fe: between(3, 8),
    Al: between(0.5, 1.5),
    Cr: between(0.1, 0.4),
    Cu: between(0.5, 2),
    Pb: between(0.2, 0.8),
    Sn: between(0, 0.2),
    Ni: between(0, 0.2),
    Si: between(0.5, 1.5),
  };
  const own: Partial<Record<MeasurandCode, number>> = {
    Si: 3,
    Na: between(2, 6),
    K: 0,
    B: between(2, 60),
    Mo: between(0, 80),
    Zn: between(900, 1200),
    P: between(800, 1000),
    Ca: between(1800, 2600),
    Mg: between(10, 30),
  };
  // Machines of one crew pouring one product share its additive pack: drawn from the oil's own seed, after the
  // machine's own draws so a machine without it is the same machine as before.
  if (options.oilSeed !== undefined) {
    const oilRandom = makeRandom(options.oilSeed);
    const pick = (a: number, b: number) => a + (b - a) * oilRandom();
    Object.assign(own, {
      Na: pick(2, 6),
      B: pick(2, 60),
      Mo: pick(0, 80),
      Zn: pick(900, 1200),
      P: pick(800, 1000),
      Ca: pick(1800, 2600),
      Mg: pick(10, 30),
    });
  }
  // Machines of one engine wear alike: the engine's rates are drawn once from its seed over the same ranges, and
  // each machine sits within ±ENGINE_SPREAD of them (riding and care; the size is from memory, no published source).
  if (options.engineSeed !== undefined) {
    const engineRandom = makeRandom(options.engineSeed);
    const pick = (a: number, b: number) => a + (b - a) * engineRandom();
    const engine: Partial<Record<MeasurandCode, number>> = {
      Fe: pick(3, 8),
      Al: pick(0.5, 1.5),
      Cr: pick(0.1, 0.4),
      Cu: pick(0.5, 2),
      Pb: pick(0.2, 0.8),
      Sn: pick(0, 0.2),
      Ni: pick(0, 0.2),
      Si: pick(0.5, 1.5),
    };
    for (const code of Object.keys(engine) as MeasurandCode[])
      rates[code] = engine[code]! * (1 + ENGINE_SPREAD * (2 * random() - 1));
  }
  const shear = between(0.03, 0.06);
  const fuel = between(0.3, 0.9);
  const tbn = between(6, 8);
  const tan = between(1.5, 2.5);
  const lab = (truth: number, additive: boolean) => {
    const v = Math.round(Math.max(0, truth * (1 + (additive ? 0.08 : rsd) * normal())));
    return v < 1 ? { value: 1, qualifier: '<' as const } : { value: v };
  };
  const samples: SamplePoint[] = [];
  let odometer = between(500, 20000);
  let day = Date.UTC(2022, 0, 1);
  for (let i = 1; i <= SAMPLES_PER_MACHINE; i++) {
    const distance = Math.round(nominal * between(0.85, 1.15));
    odometer += distance;
    day += Math.round(distance / pace) * DAY_MS;
    const factor = (code: MeasurandCode) =>
      i >= CHANGE_FROM_SAMPLE &&
      ((scenario === 'iron-x2' && code === 'Fe') || (scenario === 'aluminium-x3' && code === 'Al'))
        ? scenario === 'iron-x2'
          ? 2
          : 3
        : 1;
    const readings: SamplePoint['readings'] = {};
    for (const code of [
      'Fe',
      'Al',
      'Cr',
      'Cu',
      'Pb',
      'Sn',
      'Ni',
      'Si',
      'Na',
      'K',
      'B',
      'Mo',
      'Zn',
      'P',
      'Ca',
      'Mg',
    ] as MeasurandCode[]) {
      const truth = ((rates[code] ?? 0) * factor(code) * distance) / 1000 + (own[code] ?? 0);
      readings[code] = lab(truth, ['Mo', 'Zn', 'P', 'Ca', 'Mg'].includes(code));
    }
    readings.KV100 = { value: Math.round(14 * (1 - shear) * (1 + 0.02 * normal()) * 10) / 10 };
    readings.FUEL = { value: Math.max(0.1, Math.round((fuel + 0.15 * normal()) * 10) / 10) };
    readings.WATER = { value: 0.05, qualifier: '<' };
    readings.FLASH = { value: Math.round(215 + 5 * normal()) };
    readings.TBN = { value: Math.round((tbn + 0.3 * normal()) * 10) / 10 };
    readings.TAN = { value: Math.round((tan + 0.2 * normal()) * 10) / 10 };
    const takenAt = new Date(day).toISOString().slice(0, 10);
    samples.push({
      id: `m${seed}-s${i}`,
      takenAt,
      resultsOn: new Date(day + Math.round(between(7, 40)) * DAY_MS).toISOString().slice(0, 10),
      odometer,
      distanceOnOil: distance,
      grade: '10W-40',
      oilProduct: 'Simulated Trail 10W-40',
      readings,
    } as SamplePoint);
  }
  return { machine: { cooling, distanceUnit: 'km', maxIntervalDistance: 6000 }, samples };
}

export interface SimulationFigures {
  machines: number;
  /** Stable machines with at least one shorten call, and with at least one act finding, in %. */
  stableAnyShortenPercent: number;
  stableAnyActPercent: number;
  /** Iron ×2 from sample 8: watch or worse on Fe at sample 8 or 9, in %. */
  ironDetectedPercent: number;
  /** Aluminium ×3 from sample 8: act on Al at sample 8 or 9, in %. */
  aluminiumDetectedPercent: number;
}

function hasLevelOn(j: JudgedSample, code: string, level: 'watch' | 'act'): boolean {
  return j.findings.some((f) => f.measurands.includes(code) && (level === 'watch' || f.level === 'act'));
}

/** Runs `machines` machines of each scenario through an engine and counts false alarms and detections. */
export function runSimulation(
  judge: (m: SimulatedMachine) => JudgedSample[],
  machines = 300,
  seed = 20261202,
): SimulationFigures {
  let shorten = 0;
  let act = 0;
  let iron = 0;
  let aluminium = 0;
  const within = [CHANGE_FROM_SAMPLE - 1, CHANGE_FROM_SAMPLE];
  for (let k = 0; k < machines; k++) {
    const stable = judge(simulateMachine(seed + k, 'stable'));
    if (stable.some((j) => j.call === 'shorten')) shorten++;
    if (stable.some((j) => j.findings.some((f) => f.level === 'act'))) act++;
    const fe = judge(simulateMachine(seed + 100_000 + k, 'iron-x2'));
    if (within.some((i) => hasLevelOn(fe[i]!, 'Fe', 'watch'))) iron++;
    const al = judge(simulateMachine(seed + 200_000 + k, 'aluminium-x3'));
    if (within.some((i) => hasLevelOn(al[i]!, 'Al', 'act'))) aluminium++;
  }
  const pct = (n: number) => Math.round((1000 * n) / machines) / 10;
  return {
    machines,
    stableAnyShortenPercent: pct(shorten),
    stableAnyActPercent: pct(act),
    ironDetectedPercent: pct(iron),
    aluminiumDetectedPercent: pct(aluminium),
  };
}

export interface CrewSimulationFigures {
  crews: number;
  /** Other machines of the same engine in each crew. */
  peers: number;
  /** New stable machines judged on a crew reference of stable peers: with any shorten, with any act, in %. */
  newAnyShortenPercent: number;
  newAnyActPercent: number;
  /** Samples of the new machines judged with at least one crew reference band, in % (shows the reference was used). */
  crewJudgedSamplesPercent: number;
}

const SHIFT_DAYS = 1000;

/**
 * A crew of `peers` stable machines of one engine (cooling set alike, one oil product with one additive pack) and
 * one new stable machine that joins after
 * them: its samples start SHIFT_DAYS later, so the peers' histories (about 2.4 years at the simulated pace) are
 * there to build a reference. Peers are judged on their own first; their act readings stay out of the reference,
 * as production keeps them out.
 */
export function simulateCrew(
  seed: number,
  peers: number,
  replay: typeof import('~/lib/analysis/interval-call').replayHistory,
) {
  const cooling = makeRandom(seed)() < 0.5 ? ('air' as const) : ('liquid' as const);
  const reference: CrewReferenceSample[] = [];
  for (let p = 0; p < peers; p++) {
    const peer = simulateMachine(seed * 16 + p, 'stable', { oilSeed: seed, engineSeed: seed + 1 });
    const machine = { ...peer.machine, cooling };
    const judged = replay({ machine, samples: peer.samples });
    peer.samples.forEach((s, i) => {
      const acted = Object.entries(judged[i]!.analysis.readingLevels)
        .filter(([, l]) => l === 'act')
        .map(([c]) => c as MeasurandCode);
      reference.push({ ...s, id: `${s.id}-peer${p}`, machineId: `peer${p}`, outOfBaseline: new Set(acted) });
    });
  }
  reference.sort((a, b) => a.takenAt.localeCompare(b.takenAt));
  const fresh = simulateMachine(seed * 16 + 15, 'stable', { oilSeed: seed, engineSeed: seed + 1 });
  const later = (iso: string) => new Date(Date.parse(iso) + SHIFT_DAYS * DAY_MS).toISOString().slice(0, 10);
  const samples = fresh.samples.map((s) => ({
    ...s,
    takenAt: later(s.takenAt),
    resultsOn: s.resultsOn ? later(s.resultsOn) : undefined,
  }));
  const machine: MachineProfile = {
    ...fresh.machine,
    cooling,
    crewReference: { label: "from the crew's other simulated engines", samples: reference },
  };
  return { machine, samples };
}

/** Runs `crews` simulated crews and counts the new machine's false alarms on a crew reference. */
export function runCrewSimulation(
  replay: typeof import('~/lib/analysis/interval-call').replayHistory,
  crews = 300,
  peers = 4,
  seed = 20261203,
): CrewSimulationFigures {
  let shorten = 0;
  let act = 0;
  let crewJudged = 0;
  let judged = 0;
  for (let k = 0; k < crews; k++) {
    const crew = simulateCrew(seed + k, peers, replay);
    const replayed = replay(crew);
    if (replayed.some((r) => r.call.call === 'shorten')) shorten++;
    if (replayed.some((r) => r.analysis.findings.some((f) => f.level === 'act'))) act++;
    for (const r of replayed) {
      judged++;
      if (r.analysis.crewReference) crewJudged++;
    }
  }
  const pct = (n: number, of: number) => Math.round((1000 * n) / of) / 10;
  return {
    crews,
    peers,
    newAnyShortenPercent: pct(shorten, crews),
    newAnyActPercent: pct(act, crews),
    crewJudgedSamplesPercent: pct(crewJudged, judged),
  };
}
