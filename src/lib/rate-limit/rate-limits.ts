import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import type pg from 'pg';
import { createHash } from 'node:crypto';

// Counters live in PostgreSQL (table rate_limits, created by migration 2026_12_02_0200), so limits hold
// across restarts and several server processes. Numbers are common practice, no published source, chosen
// so a real owner who mistypes is never held for more than a few minutes.

export interface LimitRule {
  keyPrefix: string;
  points: number;
  /** Window in seconds. */
  duration: number;
  /** Extra block in seconds once the window's points are spent (0: wait for the window to end). */
  blockDuration?: number;
}

export const LIMIT_RULES = {
  /** Wrong passwords for one account from one address: five, then a short wait. */
  signInAccountIp: { keyPrefix: 'signin_acct_ip', points: 5, duration: 5 * 60 } as LimitRule,
  /**
   * Sign-in attempts on one account from browsers it has never signed in from, whatever the address: a
   * rotating address cannot reset it. It ends 15 minutes after the first attempt of its window, and a
   * browser the owner signed in from before is not held by it, so an attacker cannot lock the owner out.
   */
  signInAccount: { keyPrefix: 'signin_acct', points: 10, duration: 15 * 60 } as LimitRule,
  /** Sign-in attempts from one address across all accounts (credential stuffing). */
  signInIp: { keyPrefix: 'signin_ip', points: 30, duration: 15 * 60 } as LimitRule,
  signUpIp: { keyPrefix: 'signup_ip', points: 20, duration: 60 * 60 } as LimitRule,
  resetIp: { keyPrefix: 'reset_ip', points: 10, duration: 15 * 60 } as LimitRule,
  resetEmail: { keyPrefix: 'reset_email', points: 3, duration: 60 * 60 } as LimitRule,
  inviteUser: { keyPrefix: 'invite_user', points: 20, duration: 60 * 60 } as LimitRule,
  /** Invitations one crew sends per day, whoever of its leads sends them. */
  inviteCrew: { keyPrefix: 'invite_crew', points: 30, duration: 24 * 60 * 60 } as LimitRule,
  /** Fresh verification links for one account, and from one address. */
  verifyResendUser: { keyPrefix: 'verify_user', points: 3, duration: 60 * 60 } as LimitRule,
  verifyResendIp: { keyPrefix: 'verify_ip', points: 10, duration: 60 * 60 } as LimitRule,
  /** Password changes (each checks the current password) for one account. */
  passwordChangeUser: { keyPrefix: 'pwchange_user', points: 5, duration: 15 * 60 } as LimitRule,
} as const;

export type LimitName = keyof typeof LIMIT_RULES;

export interface LimitVerdict {
  allowed: boolean;
  /** Seconds until another attempt is accepted (for Retry-After). */
  retryAfterSeconds: number;
}

/** The rate limiters, one per rule, over one pg pool. */
export interface RateLimits {
  /** Whether the key may still spend a point, without spending one. */
  check(name: LimitName, key: string): Promise<LimitVerdict>;
  /**
   * Spends one point; the verdict says whether this attempt stayed within the limit. Spend before doing the
   * work: the spend is one atomic upsert, so parallel attempts cannot all slip under the limit.
   */
  consume(name: LimitName, key: string): Promise<LimitVerdict>;
  /** Gives one point back (an attempt that turned out to be the owner's). */
  refund(name: LimitName, key: string): Promise<void>;
  /** Forgets a key (a successful sign-in clears its failures). */
  reset(name: LimitName, key: string): Promise<void>;
}

const secondsFrom = (res: RateLimiterRes) => Math.max(1, Math.ceil(res.msBeforeNext / 1000));

/** The stored key column holds 255 characters; a longer key (a 254-character e-mail and an address) is hashed. */
const storedKey = (key: string) =>
  key.length <= 200 ? key : `sha256:${createHash('sha256').update(key).digest('hex')}`;

/** Builds the limiters; rules may be overridden (tests use smaller windows). */
export function createRateLimits(pool: pg.Pool, rules: Record<LimitName, LimitRule> = LIMIT_RULES): RateLimits {
  const limiters = new Map<LimitName, RateLimiterPostgres>();
  const limiter = (name: LimitName) => {
    let l = limiters.get(name);
    if (!l) {
      const rule = rules[name];
      l = new RateLimiterPostgres({
        storeClient: pool,
        tableName: 'rate_limits',
        tableCreated: true,
        clearExpiredByTimeout: false,
        keyPrefix: rule.keyPrefix,
        points: rule.points,
        duration: rule.duration,
        blockDuration: rule.blockDuration ?? 0,
      });
      limiters.set(name, l);
    }
    return l;
  };
  return {
    async check(name, key) {
      const res = await limiter(name).get(storedKey(key));
      if (res && res.consumedPoints >= rules[name].points)
        return { allowed: false, retryAfterSeconds: secondsFrom(res) };
      return { allowed: true, retryAfterSeconds: 0 };
    },
    async consume(name, key) {
      try {
        await limiter(name).consume(storedKey(key), 1);
        return { allowed: true, retryAfterSeconds: 0 };
      } catch (rejection) {
        if (rejection instanceof RateLimiterRes) return { allowed: false, retryAfterSeconds: secondsFrom(rejection) };
        throw rejection;
      }
    },
    async refund(name, key) {
      await limiter(name).reward(storedKey(key), 1);
    },
    async reset(name, key) {
      await limiter(name).delete(storedKey(key));
    },
  };
}
