/**
 * Delivering alerts by preference. Every alert to every recipient has a dedupe key (the idempotency
 * keys plus the recipient: `import-alert:<importId>:<userId>`, `reminder:sample-due:<machine>:<target>:<user>`).
 * In the caller's transaction, per recipient: look up the preference; "off" writes nothing; otherwise record
 * the key in alert_deliveries (a key seen before ends it there: a retried job or import never alerts twice) and
 * either queue the mail in the outbox (same key as its idempotency key) or file a digest item. The daily
 * digest collects a user's waiting items into one message keyed `digest:<userId>:<day>`.
 */
import type { Kysely, Transaction } from 'kysely';
import { getConfig } from '../config';
import type { Database, NotificationKind } from '../db/database';
import { queueMail } from '../mail/mail.service';
import { resolveDeliveries } from '../notification-preferences/notification-preferences.service';
import {
  buildUnsubscribeHeaders,
  composeImportFindingsAlert,
  IMPORT_ALERT_SAMPLES_PER_MACHINE,
  renderAlertMail,
  renderDigestMail,
  type AlertContent,
  type ImportMachineInput,
} from './alert-mail';
import {
  describeUnsubscribeScope,
  formatUtcDay,
  isDeliverableAddress,
  MAIL_KIND,
  type AlertEnv,
  type AlertOutcome,
} from './alerts';
import {
  findImportHeader,
  findUserAddress,
  hasOutboxKey,
  insertAlertDelivery,
  insertDigestItem,
  listCrewRecipients,
  listImportFindings,
  listUsersWithPendingDigest,
  lockPendingDigestItems,
  markDigested,
  type RecipientRow,
} from './alerts.repository';
import { readAppSecret } from './secret';
import { signUnsubscribeToken, type UnsubscribeScope } from './unsubscribe-token';

type Db = Kysely<Database> | Transaction<Database>;

/** Links and signing key from the configuration (APP_SECRET, or the generated .data/app-secret). */
export function loadAlertEnv(): AlertEnv {
  const config = getConfig();
  return { publicUrl: config.PUBLIC_URL.replace(/\/+$/, ''), secret: readAppSecret(config.APP_SECRET) };
}

/** The page, one-click and preferences addresses for an unsubscribe scope. */
export function buildUnsubscribeLinks(env: AlertEnv, scope: UnsubscribeScope) {
  const token = signUnsubscribeToken(scope, env.secret);
  return {
    pageUrl: `${env.publicUrl}/unsubscribe?token=${token}`,
    oneClickUrl: `${env.publicUrl}/api/unsubscribe?token=${token}`,
    preferencesUrl: `${env.publicUrl}/account/notifications`,
  };
}

/** One alert for one recipient, before preferences are applied. */
export interface AlertForRecipient {
  recipient: Pick<RecipientRow, 'user_id' | 'email' | 'email_verified'>;
  dedupeKey: string;
  content: AlertContent;
}

/** Delivers alerts of one kind from one crew to their recipients by preference (see the top of this file). */
export async function deliverAlerts(
  db: Db,
  env: AlertEnv,
  input: { crewId: string; crewName: string; kind: NotificationKind; alerts: readonly AlertForRecipient[] },
): Promise<AlertOutcome[]> {
  const deliveries = await resolveDeliveries(
    db,
    input.crewId,
    input.kind,
    input.alerts.map((a) => a.recipient.user_id),
  );
  const outcomes: AlertOutcome[] = [];
  for (const alert of input.alerts) {
    const { recipient } = alert;
    const delivery = deliveries.get(recipient.user_id) ?? 'off';
    if (delivery === 'off') {
      outcomes.push('off');
      continue;
    }
    // Alerts go only to confirmed addresses: an account made with someone else's address must not turn
    // Sumpwise into a way of mailing them.
    if (!recipient.email_verified || !isDeliverableAddress(recipient.email)) {
      outcomes.push('unconfirmed');
      continue;
    }
    const fresh = await insertAlertDelivery(db, {
      dedupeKey: alert.dedupeKey,
      userId: recipient.user_id,
      crewId: input.crewId,
      kind: input.kind,
      delivery,
    });
    if (!fresh) {
      outcomes.push('duplicate');
      continue;
    }
    if (delivery === 'digest') {
      await insertDigestItem(db, {
        dedupeKey: alert.dedupeKey,
        userId: recipient.user_id,
        crewId: input.crewId,
        kind: input.kind,
        title: alert.content.title,
        lines: alert.content.lines,
      });
      outcomes.push('digest');
      continue;
    }
    const links = buildUnsubscribeLinks(env, { userId: recipient.user_id, crewId: input.crewId, kind: input.kind });
    const mail = renderAlertMail(alert.content, {
      unsubscribeUrl: links.pageUrl,
      unsubscribeWhat: describeUnsubscribeScope(input.kind, input.crewName),
      preferencesUrl: links.preferencesUrl,
    });
    await queueMail(db, {
      to: recipient.email,
      subject: mail.subject,
      text: mail.text,
      html: mail.html,
      idempotencyKey: alert.dedupeKey,
      kind: MAIL_KIND[input.kind],
      headers: buildUnsubscribeHeaders(links.oneClickUrl),
    });
    outcomes.push('immediate');
  }
  return outcomes;
}

/**
 * The hook of a confirmed lab import, run inside its transaction after the findings are stored: one message
 * per recipient (the machine's rider, the crew's mechanics and leads) listing their machines with findings at
 * watch or act. Nothing when the import brought none.
 */
export async function queueImportAlerts(
  trx: Db,
  importId: string,
  env: AlertEnv = loadAlertEnv(),
): Promise<AlertOutcome[]> {
  const header = await findImportHeader(trx, importId);
  if (!header) return [];
  const rows = await listImportFindings(trx, importId, IMPORT_ALERT_SAMPLES_PER_MACHINE);
  if (rows.length === 0) return [];

  const machines = new Map<string, { owner: string; input: ImportMachineInput }>();
  const samples = new Map<string, ImportMachineInput['samples'][number]>();
  for (const r of rows) {
    let m = machines.get(r.machine_id);
    if (!m) {
      m = {
        owner: r.owner_user_id,
        input: {
          name: r.machine_name,
          url: `${env.publicUrl}/machines/${r.machine_id}`,
          samples: [],
          totals: { acts: r.machine_acts, watches: r.machine_watches, samples: r.machine_samples },
        },
      };
      machines.set(r.machine_id, m);
    }
    let s = samples.get(r.sample_id);
    if (!s) {
      s = {
        bottleCode: r.bottle_code,
        drawnOn: r.drawn_on,
        url: `${env.publicUrl}/samples/${r.sample_id}`,
        findings: [],
      };
      samples.set(r.sample_id, s);
      m.input.samples.push(s);
    }
    s.findings.push({ level: r.level, measurand: r.measurand, sentence: r.sentence });
  }

  const owners = [...new Set([...machines.values()].map((m) => m.owner))];
  const recipients = await listCrewRecipients(trx, header.crew_id, ['mechanic', 'lead'], owners);
  const alerts: AlertForRecipient[] = [];
  for (const recipient of recipients) {
    // Mechanics and leads look after every machine of the crew; a rider hears about their own.
    const theirs = [...machines.values()]
      .filter((m) => recipient.role !== 'rider' || m.owner === recipient.user_id)
      .map((m) => m.input);
    if (theirs.length === 0) continue;
    alerts.push({
      recipient,
      dedupeKey: `import-alert:${importId}:${recipient.user_id}`,
      content: composeImportFindingsAlert({
        crewName: header.crew_name,
        fileName: header.file_name,
        homeUrl: `${env.publicUrl}/`,
        machines: theirs,
      }),
    });
  }
  return deliverAlerts(trx, env, {
    crewId: header.crew_id,
    crewName: header.crew_name,
    kind: 'import_findings',
    alerts,
  });
}

/** What one digest run did. */
export interface DigestReport {
  queued: number;
  /** Users whose digest for the day was already queued: their new items wait for tomorrow's. */
  deferred: number;
}

/**
 * Queues one digest per user with waiting items filed up to `now`, each in its own transaction that locks the
 * items, queues `digest:<userId>:<day>` and marks the items; a re-run on the same day sends nothing again.
 */
export async function sendDailyDigests(
  db: Kysely<Database>,
  options: { now: Date; env?: AlertEnv },
): Promise<DigestReport> {
  const env = options.env ?? loadAlertEnv();
  const day = formatUtcDay(options.now);
  const report: DigestReport = { queued: 0, deferred: 0 };
  for (const userId of await listUsersWithPendingDigest(db, options.now)) {
    const outcome = await db.transaction().execute(async (trx) => {
      const items = await lockPendingDigestItems(trx, userId, options.now);
      if (items.length === 0) return 'none' as const;
      const key = `digest:${userId}:${day}`;
      if (await hasOutboxKey(trx, key)) return 'deferred' as const;
      const user = await findUserAddress(trx, userId);
      if (user && user.email_verified && isDeliverableAddress(user.email)) {
        const links = buildUnsubscribeLinks(env, { userId, crewId: null, kind: 'digest' });
        const mail = renderDigestMail(
          {
            day,
            homeUrl: `${env.publicUrl}/`,
            entries: items.map((i) => ({ crewName: i.crew_name, title: i.title, lines: i.lines })),
          },
          {
            unsubscribeUrl: links.pageUrl,
            unsubscribeWhat: describeUnsubscribeScope('digest', null),
            preferencesUrl: links.preferencesUrl,
          },
        );
        await queueMail(trx, {
          to: user.email,
          subject: mail.subject,
          text: mail.text,
          html: mail.html,
          idempotencyKey: key,
          kind: MAIL_KIND.digest,
          headers: buildUnsubscribeHeaders(links.oneClickUrl),
        });
      }
      // An address that can no longer receive mail still clears its items, so they do not pile up forever.
      await markDigested(
        trx,
        items.map((i) => i.id),
        key,
        options.now,
      );
      return 'queued' as const;
    });
    if (outcome !== 'none') report[outcome] += 1;
  }
  return report;
}
