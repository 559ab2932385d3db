import { describe, expect, test } from 'vitest';
import { capitalise, describeFindingReason } from '~/lib/analysis/finding-words';
import { RULE_DEFINITIONS } from '~/lib/analysis/rule-definitions';
import type { RuleId } from '~/lib/analysis/types';

// Every RuleId of types.ts; the `satisfies` makes a new rule a compile error here until it has a row.
const EVERY_RULE = {
  'baseline-jump': ['Fe', 'iron well above normal'],
  'climbing-trend': ['Al', 'aluminium climbing'],
  'fixed-limit': ['Cu', 'copper past the alert limit'],
  'viscosity-grade': ['KV100', 'oil out of its grade'],
  'fuel-dilution': ['FUEL', 'fuel in the oil'],
  'coolant-markers': ['K', 'coolant markers rising'],
  dirt: ['Si', 'dirt getting in'],
  'additive-mismatch': ['Zn', 'a different or mixed oil'],
  'viscosity-change': ['KV100', 'viscosity changed from new'],
  'condition-trend': ['TBN', 'base reserve changing: oil ageing'],
  'flash-point': ['FLASH', 'flash point low: fuel in the oil?'],
  'clutch-friction': ['Ca', 'clutch material in the oil'],
} satisfies Record<RuleId, [string, string]>;

describe('describeFindingReason', () => {
  test.each(Object.entries(EVERY_RULE))('%s', (rule, [measurand, expected]) => {
    expect(describeFindingReason(rule, measurand)).toBe(expected);
  });

  test.each([
    ['climbing-trend', 'K', 'coolant markers rising'],
    ['climbing-trend', 'Na', 'coolant markers rising'],
    ['baseline-jump', 'B', 'coolant markers rising'],
    ['climbing-trend', 'Si', 'dirt getting in'],
    ['fixed-limit', 'Si', 'dirt getting in'],
    ['fixed-limit', 'FUEL', 'fuel in the oil'],
    ['fixed-limit', 'WATER', 'water in the oil'],
    ['climbing-trend', null, 'a reading climbing'],
    ['fixed-limit', 'not-a-code', 'a reading past an alert limit'],
    ['a-rule-from-an-older-engine', 'Fe', 'iron out of the usual'],
    ['a-rule-from-an-older-engine', null, 'a finding to read'],
  ])('%s · %s → %s', (rule, measurand, expected) => {
    expect(describeFindingReason(rule, measurand)).toBe(expected);
  });

  test('every rule the rules page defines has its own wording, never the fallback', () => {
    const judged = RULE_DEFINITIONS.filter((d) => d.id in EVERY_RULE);
    expect(judged.length).toBe(Object.keys(EVERY_RULE).length);
    for (const def of judged) {
      expect(describeFindingReason(def.id, 'Fe')).not.toMatch(/out of the usual|a finding to read/);
    }
  });

  test('no reason carries a measurand code or a rule id', () => {
    for (const [rule, [m]] of Object.entries(EVERY_RULE)) {
      const words = describeFindingReason(rule, m);
      if (rule.includes('-')) expect(words).not.toContain(rule); // 'dirt' is both an id and a plain word
      expect(words).not.toMatch(/\b(Fe|Al|Cu|Si|K|Na|B|Zn|Ca|KV100|TBN|FLASH|FUEL)\b/);
    }
  });

  test('capitalise', () => expect(capitalise('fuel in the oil')).toBe('Fuel in the oil'));
});
