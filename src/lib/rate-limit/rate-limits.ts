import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import type pg from 'pg';

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
  /** Wrong passwords from one address across all accounts (credential stuffing). */
  signInIp: { keyPrefix: 'signin_ip', points: 30, duration: 15 * 60 } as LimitRule,
  signUpIp: { keyPrefix: 'signup_ip', points: 20, duration: 60 * 60 } as LimitRule,
  resetIp: { keyPrefix: 'reset_ip', points: 10, duration: 15 * 60 } as LimitRule,
  resetEmail: { keyPrefix: 'reset_email', points: 3, duration: 60 * 60 } as LimitRule,
  inviteUser: { keyPrefix: 'invite_user', points: 20, duration: 60 * 60 } as LimitRule,
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
  /** Spends one point; the verdict says whether this attempt stayed within the limit. */
  consume(name: LimitName, key: string): Promise<LimitVerdict>;
  /** Forgets a key (a successful sign-in clears its failures). */
  reset(name: LimitName, key: string): Promise<void>;
}

const secondsFrom = (res: RateLimiterRes) => Math.max(1, Math.ceil(res.msBeforeNext / 1000));

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
      const res = await limiter(name).get(key);
      if (res && res.consumedPoints >= rules[name].points) return { allowed: false, retryAfterSeconds: secondsFrom(res) };
      return { allowed: true, retryAfterSeconds: 0 };
    },
    async consume(name, key) {
      try {
        await limiter(name).consume(key, 1);
        return { allowed: true, retryAfterSeconds: 0 };
      } catch (rejection) {
        if (rejection instanceof RateLimiterRes) return { allowed: false, retryAfterSeconds: secondsFrom(rejection) };
        throw rejection;
      }
    },
    async reset(name, key) {
      await limiter(name).delete(key);
    },
  };
}
