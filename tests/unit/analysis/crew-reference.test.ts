/**
 * The crew reference: which machines count as the same engine, when a reference exists, that it is built with the
 * same band rules as a machine's own, that the machine's own band takes over once ready, and that it never earns
 * a stretch. Figures are invented; the 5 % displacement tolerance is a Sumpwise choice (CREW_REFERENCE).
 */
import { describe, expect, test } from 'vitest';
import { analyseSample } from '~/lib/analysis/analyse-sample';
import { computeBaselineBand } from '~/lib/analysis/baseline';
import {
  crewReferenceLabel,
  describeEngine,
  isSameEngine,
  type EngineDescription,
} from '~/lib/analysis/crew-reference';
import { replayHistory } from '~/lib/analysis/interval-call';
import { BASELINE_JUMP, CREW_REFERENCE, SIMULATED_RATES, labScatterAt } from '~/lib/analysis/rule-definitions';
import type { CrewReferenceSample, MachineProfile, SamplePoint } from '~/lib/analysis/types';
import { makeSample } from './sample-builder';
import { runCrewSimulation, simulateCrew } from './simulated-machines';

const SINGLE_450: EngineDescription = {
  layout: 'single',
  displacementCc: 450,
  cooling: 'liquid',
  sharedOil: true,
  distanceUnit: 'km',
};
const LABEL = "from the crew's other 450 cc liquid-cooled singles";

describe('isSameEngine', () => {
  test.each<[string, Partial<EngineDescription>, boolean]>([
    ['the same engine', {}, true],
    ['a twin of the same size', { layout: 'twin' }, false],
    ['472 cc (4.9 % larger)', { displacementCc: 472 }, true],
    ['472.5 cc (exactly 5 % larger)', { displacementCc: 472.5 }, true],
    ['473 cc (5.1 % larger)', { displacementCc: 473 }, false],
    ['427.5 cc (exactly 5 % smaller)', { displacementCc: 427.5 }, true],
    ['427 cc (5.1 % smaller)', { displacementCc: 427 }, false],
    ['unknown displacement', { displacementCc: null }, false],
    ['air-cooled', { cooling: 'air' }, false],
    ['oil-cooled', { cooling: 'oil' }, false],
    ['a separate gearbox oil', { sharedOil: false }, false],
    ['on an hour meter', { distanceUnit: 'h' }, false],
    ['on miles instead of kilometres (rates convert)', { distanceUnit: 'mi' }, true],
  ])('%s → %s', (_name, change, expected) => {
    expect(isSameEngine(SINGLE_450, { ...SINGLE_450, ...change })).toBe(expected);
  });

  test('a machine of unknown displacement has no same engine', () => {
    expect(isSameEngine({ ...SINGLE_450, displacementCc: null }, SINGLE_450)).toBe(false);
  });

  test.each<[Pick<EngineDescription, 'layout' | 'displacementCc' | 'cooling'>, string]>([
    [SINGLE_450, LABEL],
    [{ layout: 'twin', displacementCc: 689.4, cooling: 'air' }, "from the crew's other 689 cc air-cooled twins"],
    [{ layout: 'other', displacementCc: 125, cooling: 'oil' }, "from the crew's other 125 cc oil-cooled engines"],
  ])('label of %o', (engine, label) => {
    expect(crewReferenceLabel(engine)).toBe(label);
    expect(label).toContain(describeEngine(engine));
  });
});

/** Peer samples: `machines` machines, `each` samples apiece, iron `fe` ppm after 3,000 km, dated before the new machine. */
function peers(
  machines: number,
  each: number,
  fe: (m: number, i: number) => number,
  extra: Partial<CrewReferenceSample> = {},
): CrewReferenceSample[] {
  const out: CrewReferenceSample[] = [];
  for (let m = 0; m < machines; m++) {
    for (let i = 0; i < each; i++) {
      const s = makeSample(i - 40, { Fe: fe(m, i), Al: 3 });
      out.push({ ...s, id: `p${m}-${i}`, machineId: `peer-${m}`, ...extra });
    }
  }
  return out.sort((a, b) => a.takenAt.localeCompare(b.takenAt));
}

const withReference = (samples: readonly CrewReferenceSample[]): MachineProfile => ({
  cooling: 'liquid',
  distanceUnit: 'km',
  maxIntervalDistance: 6000,
  sharedOil: true,
  crewReference: { label: LABEL, samples },
});

describe('the crew reference band', () => {
  const feOf = (m: number, i: number) => 12 + m + (i % 3);

  test.each([
    [0, 'building', 'own'],
    [1, 'building', 'own'],
    [2, 'building', 'own'],
    [3, 'ready', 'crew'],
    [5, 'ready', 'crew'],
  ] as const)('with %i other machines: %s, %s', (machines, status, source) => {
    const analysis = analyseSample({
      machine: withReference(peers(machines, 4, feOf)),
      history: [],
      sample: makeSample(0, { Fe: 14, Al: 3 }),
    });
    expect(analysis.bands.Fe?.status).toBe(status);
    expect(analysis.bands.Fe?.source).toBe(source);
    expect(analysis.crewReference?.machines).toBe(source === 'crew' ? Math.min(machines, 10) : undefined);
  });

  test('is built with the same rules as an own band: rates per distance, the last `window` values, the same multiples', () => {
    const reference = peers(4, 4, feOf);
    const band = analyseSample({
      machine: withReference(reference),
      history: [],
      sample: makeSample(0, { Fe: 14, Al: 3 }),
    }).bands.Fe!;
    const p = BASELINE_JUMP.params;
    // Every peer sample ran 3,000 km: the rate is ppm · 1,000 / 3,000, and the floor scales the same way.
    const expected = computeBaselineBand(
      reference.map((s) => (s.readings.Fe!.value * 1000) / 3000),
      {
        minSamples: p.minSamples,
        window: p.window,
        watchAlpha: p.watchAlpha,
        actAlpha: p.actAlpha,
        floorAt: (level) => (labScatterAt((level * 3000) / 1000) * 1000) / 3000,
      },
    );
    expect(band).toMatchObject({ ...expected, basis: 'rate', source: 'crew', crew: { label: LABEL, machines: 4 } });
    expect(band.sampleIds).toEqual(reference.slice(-p.window).map((s) => s.id));
  });

  test("the machine's own band takes over once it is ready", () => {
    const own = [0, 1, 2, 3].map((i) => makeSample(i, { Fe: 13 + (i % 2), Al: 3 }));
    const machine = withReference(peers(4, 4, feOf));
    const sources = replayHistory({ machine, samples: [...own, makeSample(4, { Fe: 14, Al: 3 })] }).map(
      (r) => r.analysis.bands.Fe?.source,
    );
    expect(sources).toEqual(['crew', 'crew', 'crew', 'crew', 'own']);
  });

  test.each<[string, Partial<CrewReferenceSample> | ((s: CrewReferenceSample) => CrewReferenceSample)]>([
    ['taken out of their baseline', { baselineExcluded: { reason: 'Break-in oil.', breakIn: true } }],
    ['act on iron when their machine was judged', { outOfBaseline: new Set(['Fe' as const]) }],
    ['drawn after the sample being judged', (s) => ({ ...s, takenAt: '2030-01-01' })],
    ['at a far different oil age (1,000 km against 3,000)', (s) => ({ ...s, distanceOnOil: 1000 })],
  ])('leaves out peer samples %s', (_name, change) => {
    const reference = peers(3, 4, feOf).map((s) => (typeof change === 'function' ? change(s) : { ...s, ...change }));
    const band = analyseSample({
      machine: withReference(reference),
      history: [],
      sample: makeSample(0, { Fe: 14, Al: 3 }),
    }).bands.Fe!;
    expect(band).toMatchObject({ status: 'building', source: 'own' });
  });

  test('a reading above it names the crew reference in the finding', () => {
    const analysis = analyseSample({
      machine: withReference(peers(3, 4, feOf)),
      history: [],
      sample: makeSample(0, { Fe: 60, Al: 3 }),
    });
    const jump = analysis.findings.find((f) => f.ruleId === 'baseline-jump' && f.measurands[0] === 'Fe');
    expect(jump?.level).toBe('act');
    expect(jump?.sentence).toContain(`the crew reference band (${LABEL})`);
    expect(jump?.numbers.crewMachines).toBe(3);
  });
});

describe('no stretch on a crew reference', () => {
  /** Steady samples with every condition figure a stretch needs. */
  const steady = (i: number): SamplePoint =>
    makeSample(i, { Fe: 13, Al: 3, KV100: 13.5, FUEL: 0.5, WATER: 0.05, TBN: 7, TAN: 2 });

  test('steady samples judged on a crew reference hold, and say whose band and why', () => {
    const replayed = replayHistory({
      machine: withReference(peers(4, 6, (m, i) => 12 + m + (i % 3))),
      samples: [0, 1, 2, 3].map(steady),
    });
    for (const r of replayed) {
      expect(r.analysis.worst).toBe('steady');
      expect(r.analysis.crewReference?.label).toBe(LABEL);
      expect(r.analysis.baselineStatus).toBe('building');
      expect(r.call.basis.stretchReady).toBe(false);
      expect(r.call.call).not.toBe('stretch');
      expect(r.call.reasons.join(' ')).toContain(`crew reference band ${LABEL}`);
      expect(r.call.reasons.join(' ')).toContain('never earns a stretch');
    }
  });

  test('in the seeded crews, no sample judged on a crew reference is stretch-ready', () => {
    for (let k = 0; k < 20; k++) {
      for (const r of replayHistory(simulateCrew(20261203 + k, 4, replayHistory))) {
        if (r.analysis.crewReference) expect(r.call.basis.stretchReady).toBe(false);
      }
    }
  });
});

describe('simulated crews (seeded)', () => {
  test('a new stable machine on a crew reference of four stable peers stays within the false-alarm budget', () => {
    const figures = runCrewSimulation(replayHistory, 300, 4);
    // Budget as for a machine on its own baseline (simulation.test.ts): ≤ 10 % any shorten, ≤ 5 % any act.
    expect(figures.newAnyShortenPercent).toBeLessThanOrEqual(10);
    expect(figures.newAnyActPercent).toBeLessThanOrEqual(5);
    // The reference was really used: about the first minSamples of twelve samples of each new machine.
    expect(figures.crewJudgedSamplesPercent).toBeGreaterThan(20);
    // The rules page states what this measures.
    expect(figures).toMatchObject({
      crews: 300,
      newAnyShortenPercent: SIMULATED_RATES.crewNewAnyShortenPercent,
      newAnyActPercent: SIMULATED_RATES.crewNewAnyActPercent,
    });
  }, 120_000);

  test('with the fewest machines a reference allows (three), the budget holds too', () => {
    const figures = runCrewSimulation(replayHistory, 300, CREW_REFERENCE.params.minMachines);
    expect(figures.newAnyShortenPercent).toBeLessThanOrEqual(10);
    expect(figures.newAnyActPercent).toBeLessThanOrEqual(5);
  }, 120_000);
});
