import { describe, expect, test } from 'vitest';
import { explainForbidden, FORBIDDEN_REASONS } from '~/lib/http/forbidden';

describe('explainForbidden', () => {
  test.each(Object.entries(FORBIDDEN_REASONS))('%s has its own explanation', (reason, text) => {
    expect(explainForbidden(reason)).toBe(text);
  });
  test.each([null, '', '<script>alert(1)</script>', 'toString', '__proto__'])(
    'anything else (%s) gets the general sentence, never an echo',
    (reason) => {
      expect(explainForbidden(reason)).toBe('Your role in this crew does not allow this.');
    },
  );
});
