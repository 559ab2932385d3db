import os from 'node:os';
import { z } from 'zod';
import { isLoopbackHost, parseTrustProxy } from './http/client-address';
import './db/embedded-password';

/** Every setting Sumpwise reads from the environment, with its default for a local machine. */
export const configSchema = z
  .object({
    DATABASE_URL: z
      .string()
      .default('postgres://sumpwise@127.0.0.1:54329/sumpwise')
      .refine((v) => /^postgres(ql)?:\/\//.test(v), 'must be a postgres:// URL'),
    PUBLIC_URL: z.url({ protocol: /^https?$/ }).default('http://127.0.0.1:4321'),
    HOST: z.string().min(1).default('127.0.0.1'),
    PORT: z.coerce.number().int().min(1).max(65535).default(4321),
    SMTP_URL: z.string().default('smtp://127.0.0.1:2525'),
    MAIL_FROM: z.string().default('Sumpwise <no-reply@sumpwise.test>'),
    // Import addresses are lab-<token>@INBOUND_MAIL_DOMAIN; the domain's MX (or the local relay) delivers to us.
    INBOUND_MAIL_DOMAIN: z
      .string()
      .default('import.sumpwise.test')
      .refine(
        (v) => /^(?=.{1,253}$)([a-z0-9]([a-z0-9-]{0,61}[a-z0-9])?\.)+[a-z]{2,63}$/i.test(v),
        'must be a domain name',
      ),
    // Shared secret of the inbound webhook (HMAC-SHA256 of each request); without it the webhook answers 404.
    INBOUND_MAIL_SECRET: z.string().min(32).optional(),
    // The /dev/mailbox page (what the local fake relay received) answers 404 unless this is exactly '1', and
    // it may be '1' only on a loopback HOST: the page shows everyone's mail, reset links included.
    DEV_MAILBOX: z
      .string()
      .default('0')
      .transform((v) => v === '1'),
    // How many proxies in front append to X-Forwarded-For; 0 (off): the socket address counts, forwarded headers are ignored.
    TRUST_PROXY: z
      .string()
      .default('0')
      .transform((v, ctx) => {
        const n = parseTrustProxy(v);
        if (n === null)
          ctx.addIssue({ code: 'custom', message: 'must be off, on, or the number of proxies in front (1-9)' });
        return n ?? 0;
      }),
    // App processes the supervisor (scripts/serve.ts) runs on the one port: one per core by default, since each is
    // single-threaded and CPU-bound under load (common practice, no published source).
    APP_PROCESSES: z.coerce
      .number()
      .int()
      .min(1)
      .max(64)
      .default(() => Math.min(64, os.availableParallelism())),
    // Connections each app process keeps to PostgreSQL, for its queries, session checks and rate limits. Small on
    // purpose: processes × pool must stay under the server's max_connections with room for the worker, the relay
    // and maintenance (see the README).
    DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(8),
    // Megabytes of built wear-chart answers each app process keeps for reuse (src/lib/trends/trend-answers.ts);
    // 0 keeps none and builds every answer.
    CHART_CACHE_MB: z.coerce.number().int().min(0).max(1024).default(16),
    // Connections of the one job worker's own pool (pg-boss keeps 4 more of its own, and one per listener).
    WORKER_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(5),
    // Where photos are kept: 's3' (any S3 API; the default, served locally by a fake on loopback) or 'disk'
    // (UPLOAD_DIR, for one machine only: a second machine would not see the first one's photos).
    PHOTO_STORE: z.enum(['s3', 'disk']).default('s3'),
    UPLOAD_DIR: z.string().default('.data/uploads'),
    S3_ENDPOINT: z.url({ protocol: /^https?$/ }).default('http://127.0.0.1:4568'),
    S3_REGION: z.string().min(1).default('us-east-1'),
    S3_BUCKET: z
      .string()
      .default('sumpwise-photos')
      // Bucket naming rules of the S3 API (lower case, digits, dots, hyphens; 3-63 characters), from memory.
      .refine(
        (v) => /^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/.test(v),
        'must be an S3 bucket name (3-63 lower-case letters, digits, dots, hyphens)',
      ),
    // The local fake accepts these fixed credentials; a real store needs its own (never commit them).
    S3_ACCESS_KEY_ID: z.string().min(1).default('S3RVER'),
    S3_SECRET_ACCESS_KEY: z.string().min(1).default('S3RVER'),
    // Path-style addresses (endpoint/bucket/key) suit the fake and most self-hosted stores; '0' for virtual hosts.
    S3_FORCE_PATH_STYLE: z
      .string()
      .default('1')
      .transform((v) => v !== '0'),
    APP_SECRET: z.string().min(32).optional(),
    NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  })
  .superRefine((c, ctx) => {
    if (c.DEV_MAILBOX && !isLoopbackHost(c.HOST)) {
      ctx.addIssue({
        code: 'custom',
        path: ['DEV_MAILBOX'],
        message: `is 1, but the mailbox shows everyone's mail, password-reset links included, so it is allowed only when HOST is a loopback address (127.0.0.1, ::1 or localhost), not ${c.HOST}; unset DEV_MAILBOX or listen on loopback`,
      });
    }
  });

export type AppConfig = z.infer<typeof configSchema>;

/** Parses the environment; throws one readable line naming the bad variable. */
export function readConfig(env: Record<string, string | undefined> = process.env): AppConfig {
  const picked = Object.fromEntries(
    Object.keys(configSchema.shape).map((k) => [k, env[k] === '' ? undefined : env[k]]),
  );
  const parsed = configSchema.safeParse(picked);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new Error(`configuration: ${issue.path.join('.')} ${issue.message}`);
  }
  return parsed.data;
}

let cached: AppConfig | undefined;
/** The process's configuration, read once. */
export function getConfig(): AppConfig {
  cached ??= readConfig();
  return cached;
}

/** True when cookies must carry the Secure flag (the public URL is https). */
export function isSecureOrigin(config: AppConfig): boolean {
  return new URL(config.PUBLIC_URL).protocol === 'https:';
}
