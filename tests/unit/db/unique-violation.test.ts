import { describe, expect, test } from 'vitest';
import { uniqueViolation } from '~/lib/db/errors';

// SQLSTATE 23505 is unique_violation and 23503 foreign_key_violation (PostgreSQL manual, Appendix A).
describe('uniqueViolation', () => {
  test.each([
    ['23505 on the named constraint', { code: '23505', constraint: 'users_email_lower_key' }, true],
    ['23505 on another constraint', { code: '23505', constraint: 'users_pkey' }, false],
    ['23505 with no constraint field', { code: '23505' }, false],
    ['another code on the named constraint', { code: '23503', constraint: 'users_email_lower_key' }, false],
    [
      'the name only in the message',
      new Error('duplicate key value violates unique constraint "users_email_lower_key"'),
      false,
    ],
    ['null', null, false],
    ['a string', 'users_email_lower_key', false],
  ])('%s → %s', (_, error, expected) => {
    expect(uniqueViolation(error, 'users_email_lower_key')).toBe(expected);
  });
});
