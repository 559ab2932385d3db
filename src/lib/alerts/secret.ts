import { randomBytes } from 'node:crypto';
import { chmodSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

// The key that signs unsubscribe links. APP_SECRET when it is set; otherwise one generated on first use and
// kept in .data/app-secret (mode 600), so links in mails already sent keep working after a restart, and the
// web server and the worker (two processes) sign with the same key without any setup.

/** Where the generated secret lives when APP_SECRET is unset. */
export const DEFAULT_SECRET_FILE = path.join('.data', 'app-secret');

// 32 random bytes = 256 bits, the HMAC-SHA256 block-size guidance of RFC 2104 §3 (key at least the output length).
const GENERATED_BYTES = 32;

const cache = new Map<string, string>();

/**
 * Returns the signing secret: `appSecret` when given, else the content of `file`, creating it (random, mode
 * 600) if it does not exist yet. Two processes racing to create it agree: the file is written exclusively and
 * the loser reads the winner's.
 */
export function readAppSecret(appSecret: string | undefined, file: string = DEFAULT_SECRET_FILE): string {
  if (appSecret) return appSecret;
  const abs = path.resolve(file);
  const known = cache.get(abs);
  if (known) return known;
  let secret = tryRead(abs);
  if (!secret) {
    mkdirSync(path.dirname(abs), { recursive: true });
    const fresh = randomBytes(GENERATED_BYTES).toString('base64url');
    try {
      // 'wx': fail if it exists, so a concurrent creator's secret is never overwritten.
      writeFileSync(abs, `${fresh}\n`, { mode: 0o600, flag: 'wx' });
      // The umask cannot widen 600, but an explicit chmod documents and guarantees it.
      chmodSync(abs, 0o600);
      secret = fresh;
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      secret = tryRead(abs);
      if (!secret) throw new Error(`${file} exists but is empty; delete it to generate a new secret`);
    }
  }
  cache.set(abs, secret);
  return secret;
}

function tryRead(file: string): string | null {
  try {
    const text = readFileSync(file, 'utf8').trim();
    return text.length > 0 ? text : null;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
}
