/**
 * The oil tools page as a view model: each calculator's answer to the GET form that was sent (or idle), the
 * values to refill the forms with, and the "does a grade suit your riding" check against a machine's chart.
 * Pure: the page renders what this returns.
 */
import type { RecommendedGrade } from '../db/database';
import { toCelsius, type TemperatureUnit } from '../units/units';
import {
  checkGradeSuitsRiding,
  readNumber,
  runGradeOf,
  runSaybolt,
  runViscosityAt,
  runViscosityIndex,
} from './oil-tools';

/** A machine the suitability check can use. */
export interface ToolMachine {
  id: string;
  name: string;
  recommendedGrades: RecommendedGrade[];
}

export type SuitsCheck =
  | { state: 'idle' }
  | { state: 'error'; fields: Record<string, string> }
  | {
      state: 'ok';
      machine: string;
      grade: string;
      lo: number;
      hi: number;
      result: ReturnType<typeof checkGradeSuitsRiding>;
    };

/** Checks the "suits your riding" form: temperatures in the user's unit, the machine one of the crew's. */
export function runSuitsCheck(p: URLSearchParams, unit: TemperatureUnit, machines: readonly ToolMachine[]): SuitsCheck {
  if (p.get('tool') !== 'suits') return { state: 'idle' };
  const fields: Record<string, string> = {};
  const m = machines.find((x) => x.id === p.get('machine'));
  if (!m) fields['machine'] = 'Pick one of your crew’s machines.';
  const g = (p.get('grade') ?? '').trim();
  if (!g) fields['grade'] = 'Enter the grade, such as 10W-40.';
  const lo = readNumber(p, 'low');
  const hi = readNumber(p, 'high');
  if (typeof lo !== 'number') fields['low'] = 'Enter the coldest riding temperature as a number.';
  if (typeof hi !== 'number') fields['high'] = 'Enter the hottest riding temperature as a number.';
  if (m && m.recommendedGrades.length === 0)
    fields['machine'] = 'This machine has no temperature chart from its manual yet; add it on the machine’s page.';
  if (Object.keys(fields).length || !m || typeof lo !== 'number' || typeof hi !== 'number')
    return { state: 'error', fields };
  return {
    state: 'ok',
    machine: m.name,
    grade: g,
    lo,
    hi,
    result: checkGradeSuitsRiding(m.recommendedGrades, g, toCelsius(lo, unit), toCelsius(hi, unit)),
  };
}

/** Everything the oil tools page shows for one request. */
export function buildOilToolsView(p: URLSearchParams, unit: TemperatureUnit, machines: readonly ToolMachine[]) {
  const vi = runViscosityIndex(p);
  const sus = runSaybolt(p, unit);
  const at = runViscosityAt(p, unit);
  const grade = runGradeOf(p);
  const suit = runSuitsCheck(p, unit, machines);
  return {
    unit,
    deg: `°${unit}`,
    machines,
    selectedMachine: p.get('machine'),
    vi,
    sus,
    at,
    grade,
    suit,
    /** The message beside a field of a tool whose answer was an error. */
    errorOf: (r: { state: string; fields?: Record<string, string> }, field: string) =>
      r.state === 'error' ? r.fields?.[field] : undefined,
    /** The value a field is refilled with: only the tool that was sent keeps its values. */
    valueOf: (name: string, tool: string) => (p.get('tool') === tool ? (p.get(name) ?? '') : ''),
  };
}

/** A figure for the tools' answers: at most `digits` decimals, with thousands separators. */
export function formatToolFigure(n: number, digits = 2): string {
  return Number(n.toFixed(digits)).toLocaleString('en-US');
}
