import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { canActorEdit, listMachines } from '../machines/machines.service';
import type { Actor } from '~/lib/auth/types';

/**
 * How many machines' pages a device keeps. Every kept page is fetched again by every signed-in device every
 * few minutes, so a large crew's lead must not fetch the whole fleet; a rider's own machines come first.
 */
export const MACHINES_KEPT_OFFLINE = 12;

/**
 * The pages a device keeps for working without a network after one visit: home, the machine list, the
 * waiting-to-send list, and for up to MACHINES_KEPT_OFFLINE machines (the ones the actor may write to first)
 * the machine's page and, where the actor may write to it, its drain card and oil-change form.
 */
export async function listPagesToKeep(db: Kysely<Database>, actor: Actor): Promise<string[]> {
  const machines = (await listMachines(db, actor)).map((m) => ({ m, editable: canActorEdit(actor, m) }));
  // A stable sort keeps the list's own order within each group.
  machines.sort((a, b) => Number(b.editable) - Number(a.editable));
  const pages = ['/', '/machines', '/outbox'];
  for (const { m, editable } of machines.slice(0, MACHINES_KEPT_OFFLINE)) {
    pages.push(`/machines/${m.id}`);
    if (editable) pages.push(`/machines/${m.id}/drain-card`, `/machines/${m.id}/oil-change`);
  }
  return pages;
}
