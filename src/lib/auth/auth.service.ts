import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { uniqueViolation } from '../db/errors';
import { recordAuditEvent } from '../audit/audit.repository';
import { queueMail } from '../mail/mail.service';
import type { RateLimits } from '../rate-limit/rate-limits';
import { acceptInvitationInTransaction } from '../crews/crews.service';
import { findMembershipsForUser, insertCrew, insertMember } from '../crews/crews.repository';
import {
  deleteOtherSessions,
  findAuthToken,
  findUserByEmail,
  findUserById,
  insertAuthToken,
  insertUser,
  lockAuthToken,
  markAuthTokenUsed,
  markEmailVerified,
  updatePasswordHash,
  updateUserSettings,
  setTimeZoneIfUnset,
} from './auth.repository';
import type { ChangePasswordInput, SignInInput, SignUpInput, UnitsInput } from './auth';
import { composePasswordResetEmail, composeVerificationEmail } from './emails';
import { newUserId, type AppLucia, type SessionCookie } from './session';
import { hashPassword, verifyAgainstDummy, verifyPassword } from './password';
import { refuse, succeed, type Refusal, type Result } from '../http/result';
import { TOKEN_LIFETIME_MS, generateToken, hashToken } from './tokens';

/** What the account services need; routes build it once (see deps.ts), tests build it on the test database. */
export interface AuthDeps {
  db: Kysely<Database>;
  lucia: AppLucia;
  limits: RateLimits;
  /** Origin used in e-mailed links, e.g. https://sumpwise.example. */
  publicUrl: string;
}

/** Where a request came from (for rate limits and the audit log). */
export interface RequestMeta {
  ip: string | null;
}

const INVALID_CREDENTIALS = () =>
  refuse(401, 'invalid_credentials', 'That e-mail address and password do not match an account.');
const rateLimited = (retryAfterSeconds: number) =>
  refuse(
    429,
    'rate_limited',
    `Too many attempts. Try again in ${Math.ceil(retryAfterSeconds / 60)} minute(s).`,
    {},
    { retryAfterSeconds },
  );

function link(deps: AuthDeps, path: string): string {
  return new URL(path, deps.publicUrl).toString();
}

async function queueVerification(
  deps: AuthDeps,
  db: Parameters<typeof queueMail>[0],
  user: { id: string; email: string; display_name: string },
): Promise<string> {
  const token = generateToken();
  const tokenId = await insertAuthToken(db, {
    userId: user.id,
    purpose: 'verify_email',
    tokenHash: hashToken(token),
    email: user.email,
    expiresAt: new Date(Date.now() + TOKEN_LIFETIME_MS.verify_email),
  });
  const mail = composeVerificationEmail({
    displayName: user.display_name,
    url: link(deps, `/verify-email?token=${token}`),
    validHours: TOKEN_LIFETIME_MS.verify_email / 3_600_000,
  });
  await queueMail(db, { to: user.email, ...mail, idempotencyKey: `verify_email:${tokenId}`, kind: 'verify_email' });
  return token;
}

/**
 * Creates an account with its own crew (the user leads it), queues the verification message and opens a
 * session. With an invitation token for the same address the user also joins that crew and starts there.
 */
export async function signUp(
  deps: AuthDeps,
  input: SignUpInput,
  meta: RequestMeta,
): Promise<Result<{ userId: string; crewId: string; cookie: SessionCookie; verificationToken: string | null }>> {
  const limit = await deps.limits.consume('signUpIp', meta.ip ?? 'unknown');
  if (!limit.allowed) return rateLimited(limit.retryAfterSeconds);
  if (await findUserByEmail(deps.db, input.email)) {
    return refuse(409, 'email_taken', 'An account with this address already exists.', {
      email: 'An account with this address already exists. Sign in, or reset the password.',
    });
  }
  const passwordHash = await hashPassword(input.password);
  const userId = newUserId();
  const displayName = input.displayName?.trim() || input.email.split('@')[0]!.slice(0, 80);
  let outcome: Result<{ crewId: string; verificationToken: string | null }>;
  try {
    outcome = await deps.db.transaction().execute(async (trx) => {
      await insertUser(trx, {
        id: userId,
        email: input.email,
        displayName,
        passwordHash,
        verified: false,
        timeZone: input.timeZone,
      });
      const ownCrewId = await insertCrew(trx, `${displayName}’s crew`);
      await insertMember(trx, ownCrewId, userId, 'lead');
      await recordAuditEvent(trx, { kind: 'sign_up', actorUserId: userId, subjectUserId: userId, ip: meta.ip });
      await recordAuditEvent(trx, { kind: 'crew_created', crewId: ownCrewId, actorUserId: userId, ip: meta.ip });
      let crewId = ownCrewId;
      let verificationToken: string | null = null;
      if (input.invitation) {
        const joined = await acceptInvitationInTransaction(
          trx,
          input.invitation,
          { id: userId, email: input.email },
          meta,
        );
        // Throwing rolls the whole sign-up back: no half-made account for a bad invitation.
        if (!joined.ok) throw new SignUpAborted(joined);
        crewId = joined.value.crewId;
      } else {
        verificationToken = await queueVerification(deps, trx, {
          id: userId,
          email: input.email,
          display_name: displayName,
        });
      }
      return succeed({ crewId, verificationToken });
    });
  } catch (error) {
    if (error instanceof SignUpAborted) outcome = error.failure;
    // Two sign-ups for one address racing: the unique index on lower(email) decides.
    else if (uniqueViolation(error, 'users_email_lower_key'))
      outcome = refuse(409, 'email_taken', 'An account with this address already exists.', {
        email: 'An account with this address already exists.',
      });
    else throw error;
  }
  if (!outcome.ok) return outcome;
  const session = await deps.lucia.createSession(userId, { current_crew_id: outcome.value.crewId });
  return succeed({
    userId,
    crewId: outcome.value.crewId,
    cookie: deps.lucia.createSessionCookie(session.id),
    verificationToken: outcome.value.verificationToken,
  });
}

class SignUpAborted extends Error {
  constructor(readonly failure: Refusal) {
    super(failure.code);
  }
}

/**
 * Checks e-mail and password and opens a fresh session (the old one, if any, ends: the id rotates).
 * Unknown address and wrong password give the same answer after the same Argon2 work.
 */
export async function signIn(
  deps: AuthDeps,
  input: SignInInput,
  meta: RequestMeta & { previousSessionId?: string | null; knownDevice?: boolean },
): Promise<Result<{ userId: string; cookie: SessionCookie }>> {
  const ip = meta.ip ?? 'unknown';
  const pairKey = `${input.email}|${ip}`;
  // Spend first, then check the password: parallel guesses each spend a point before any of them is judged.
  const verdicts = [await deps.limits.consume('signInAccountIp', pairKey), await deps.limits.consume('signInIp', ip)];
  // A browser the owner signed in from before is not held by the account-wide limit, so filling it from many
  // addresses cannot lock the owner out; it still counts towards the limits of its own address.
  if (!meta.knownDevice) verdicts.push(await deps.limits.consume('signInAccount', input.email));
  const refused = verdicts.find((v) => !v.allowed);
  if (refused) {
    await recordAuditEvent(deps.db, { kind: 'sign_in_failed', ip: meta.ip, detail: { reason: 'rate_limited' } });
    return refuse(
      429,
      'rate_limited',
      `Too many sign-in attempts. Try again in ${Math.ceil(refused.retryAfterSeconds / 60)} minute(s), or reset your password by e-mail.`,
      {},
      { retryAfterSeconds: refused.retryAfterSeconds },
    );
  }
  const user = await findUserByEmail(deps.db, input.email);
  const matches = user
    ? await verifyPassword(user.password_hash, input.password)
    : await verifyAgainstDummy(input.password);
  if (!user || !matches) {
    await recordAuditEvent(deps.db, {
      kind: 'sign_in_failed',
      subjectUserId: user?.id ?? null,
      ip: meta.ip,
      detail: { reason: user ? 'wrong_password' : 'unknown_email' },
    });
    return INVALID_CREDENTIALS();
  }
  // The owner's own attempt: it clears this address's failures on the account and gives back what it spent.
  await deps.limits.reset('signInAccountIp', pairKey);
  await deps.limits.refund('signInIp', ip);
  if (!meta.knownDevice) await deps.limits.refund('signInAccount', input.email);
  if (meta.previousSessionId) await deps.lucia.invalidateSession(meta.previousSessionId);
  if (input.timeZone) await setTimeZoneIfUnset(deps.db, user.id, input.timeZone);
  const crews = await findMembershipsForUser(deps.db, user.id);
  const session = await deps.lucia.createSession(user.id, { current_crew_id: crews[0]?.crewId ?? null });
  await recordAuditEvent(deps.db, { kind: 'sign_in', actorUserId: user.id, subjectUserId: user.id, ip: meta.ip });
  return succeed({ userId: user.id, cookie: deps.lucia.createSessionCookie(session.id) });
}

/** Ends one session and returns the blank cookie that clears it in the browser. */
export async function signOut(
  deps: AuthDeps,
  session: { id: string; userId: string },
  meta: RequestMeta,
): Promise<SessionCookie> {
  await deps.lucia.invalidateSession(session.id);
  await recordAuditEvent(deps.db, {
    kind: 'sign_out',
    actorUserId: session.userId,
    subjectUserId: session.userId,
    ip: meta.ip,
  });
  return deps.lucia.createBlankSessionCookie();
}

/** Changes the password after checking the current one; every other session of the user ends. */
export async function changePassword(
  deps: AuthDeps,
  userId: string,
  currentSessionId: string,
  input: ChangePasswordInput,
  meta: RequestMeta,
): Promise<Result<{ endedSessions: number }>> {
  // A stolen session must not become a way to guess the current password without limit.
  const limit = await deps.limits.consume('passwordChangeUser', userId);
  if (!limit.allowed) return rateLimited(limit.retryAfterSeconds);
  const user = await findUserById(deps.db, userId);
  if (!user || !(await verifyPassword(user.password_hash, input.currentPassword))) {
    return refuse(400, 'wrong_password', 'The current password is not right.', {
      currentPassword: 'That is not your current password.',
    });
  }
  const passwordHash = await hashPassword(input.newPassword);
  const endedSessions = await deps.db.transaction().execute(async (trx) => {
    await updatePasswordHash(trx, userId, passwordHash);
    const ended = await deleteOtherSessions(trx, userId, currentSessionId);
    await recordAuditEvent(trx, {
      kind: 'password_changed',
      actorUserId: userId,
      subjectUserId: userId,
      ip: meta.ip,
      detail: { endedSessions: ended },
    });
    return ended;
  });
  return succeed({ endedSessions });
}

/** Queues a fresh verification message (the previous link stops working); limited per account and per address. */
export async function requestEmailVerification(
  deps: AuthDeps,
  userId: string,
  meta: RequestMeta,
): Promise<Result<{ token: string | null }>> {
  const user = await findUserById(deps.db, userId);
  if (!user) return refuse(404, 'not_found', 'No such account.');
  if (user.email_verified_at) return succeed({ token: null });
  for (const verdict of [
    await deps.limits.consume('verifyResendUser', userId),
    await deps.limits.consume('verifyResendIp', meta.ip ?? 'unknown'),
  ]) {
    if (!verdict.allowed)
      return refuse(
        429,
        'rate_limited',
        `Several links are already on their way; look for them (and in the spam folder), or ask for another in ${Math.ceil(verdict.retryAfterSeconds / 60)} minute(s).`,
        {},
        { retryAfterSeconds: verdict.retryAfterSeconds },
      );
  }
  const token = await deps.db.transaction().execute((trx) => queueVerification(deps, trx, user));
  return succeed({ token });
}

type TokenState = 'valid' | 'invalid' | 'expired' | 'used';

function tokenState(row: { expires_at: Date; used_at: Date | null } | undefined, now = new Date()): TokenState {
  if (!row) return 'invalid';
  if (row.used_at) return 'used';
  if (row.expires_at <= now) return 'expired';
  return 'valid';
}

const TOKEN_FAILURES: Record<Exclude<TokenState, 'valid'>, () => Refusal> = {
  invalid: () => refuse(400, 'invalid_token', 'This link is not valid. Ask for a new one.'),
  expired: () => refuse(400, 'expired_token', 'This link has expired. Ask for a new one.'),
  used: () => refuse(400, 'used_token', 'This link has already been used. Ask for a new one if you still need it.'),
};

/** Spends a verification token and marks the address verified. */
export async function verifyEmail(
  deps: AuthDeps,
  token: string,
  meta: RequestMeta,
): Promise<Result<{ userId: string }>> {
  return deps.db.transaction().execute(async (trx) => {
    const row = await lockAuthToken(trx, hashToken(token), 'verify_email');
    const state = tokenState(row);
    if (state !== 'valid' || !row) return TOKEN_FAILURES[state === 'valid' ? 'invalid' : state]();
    const user = await findUserById(trx, row.user_id);
    // A link for an address the account no longer has proves nothing.
    if (!user || user.email.toLowerCase() !== row.email.toLowerCase()) return TOKEN_FAILURES.invalid();
    await markAuthTokenUsed(trx, row.id);
    await markEmailVerified(trx, row.user_id);
    await recordAuditEvent(trx, {
      kind: 'email_verified',
      actorUserId: row.user_id,
      subjectUserId: row.user_id,
      ip: meta.ip,
    });
    return succeed({ userId: row.user_id });
  });
}

/**
 * Queues a reset link when the address has an account. The answer is the same either way, so the form
 * cannot be used to find out who has an account.
 */
export async function requestPasswordReset(
  deps: AuthDeps,
  email: string,
  meta: RequestMeta,
): Promise<Result<{ token: string | null }>> {
  for (const verdict of [
    await deps.limits.consume('resetIp', meta.ip ?? 'unknown'),
    await deps.limits.consume('resetEmail', email),
  ]) {
    if (!verdict.allowed) return rateLimited(verdict.retryAfterSeconds);
  }
  const user = await findUserByEmail(deps.db, email);
  if (!user) return succeed({ token: null });
  const token = generateToken();
  await deps.db.transaction().execute(async (trx) => {
    const tokenId = await insertAuthToken(trx, {
      userId: user.id,
      purpose: 'reset_password',
      tokenHash: hashToken(token),
      email: user.email,
      expiresAt: new Date(Date.now() + TOKEN_LIFETIME_MS.reset_password),
    });
    const mail = composePasswordResetEmail({
      displayName: user.display_name,
      url: link(deps, `/reset-password?token=${token}`),
      validMinutes: TOKEN_LIFETIME_MS.reset_password / 60_000,
    });
    await queueMail(trx, {
      to: user.email,
      ...mail,
      idempotencyKey: `reset_password:${tokenId}`,
      kind: 'reset_password',
    });
  });
  return succeed({ token });
}

/** Whether a reset link can still be used (the page shows the form only then). */
export async function checkResetToken(deps: Pick<AuthDeps, 'db'>, token: string): Promise<TokenState> {
  return tokenState(await findAuthToken(deps.db, hashToken(token), 'reset_password'));
}

/** Spends a reset token, sets the new password and ends every session of the account. */
export async function resetPassword(
  deps: AuthDeps,
  input: { token: string; password: string },
  meta: RequestMeta,
): Promise<Result<{ userId: string }>> {
  const passwordHash = await hashPassword(input.password);
  return deps.db.transaction().execute(async (trx) => {
    const row = await lockAuthToken(trx, hashToken(input.token), 'reset_password');
    const state = tokenState(row);
    if (state !== 'valid' || !row) return TOKEN_FAILURES[state === 'valid' ? 'invalid' : state]();
    await markAuthTokenUsed(trx, row.id);
    await updatePasswordHash(trx, row.user_id, passwordHash);
    // The link came to the mailbox, so the address is proven too.
    await markEmailVerified(trx, row.user_id);
    await deleteOtherSessions(trx, row.user_id, null);
    await recordAuditEvent(trx, { kind: 'password_reset', subjectUserId: row.user_id, ip: meta.ip });
    return succeed({ userId: row.user_id });
  });
}

/** Saves the units a user reads figures in (and optionally their display name). */
export async function updateAccountSettings(db: Kysely<Database>, userId: string, input: UnitsInput): Promise<void> {
  await updateUserSettings(db, userId, input);
}
