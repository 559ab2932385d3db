import { hash, verify, type Algorithm, type Options } from '@node-rs/argon2';

// Argon2id with m = 19 MiB, t = 2, p = 1: the minimum configuration in the OWASP Password Storage Cheat
// Sheet (Argon2id section). `2` is Algorithm.Argon2id in @node-rs/argon2 (a const enum we cannot import
// under isolatedModules).
const ARGON2ID_OPTIONS: Options = {
  algorithm: 2 as Algorithm,
  memoryCost: 19456,
  timeCost: 2,
  parallelism: 1,
  outputLen: 32,
};

/** Length rules only (NIST SP 800-63B §3.1.1.2: at least 8, allow at least 64, no composition rules). */
export const PASSWORD_MIN_LENGTH = 10;
export const PASSWORD_MAX_LENGTH = 256;

/** NFKC so the same password typed on a phone and a laptop hashes the same (NIST SP 800-63B §3.1.1.2). */
function normalizePassword(password: string): string {
  return password.normalize('NFKC');
}

/** Hashes a password with Argon2id; the PHC string carries its own salt and parameters. */
export function hashPassword(password: string): Promise<string> {
  return hash(normalizePassword(password), ARGON2ID_OPTIONS);
}

/** True when the password matches the stored hash; false (never a throw) for a malformed hash. */
export async function verifyPassword(storedHash: string, password: string): Promise<boolean> {
  try {
    return await verify(storedHash, normalizePassword(password));
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;

/** Spends the time of one real verification, so an unknown e-mail answers as slowly as a wrong password. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword('sumpwise-dummy-password-never-valid');
  await verifyPassword(await dummyHash, password);
  return false;
}
