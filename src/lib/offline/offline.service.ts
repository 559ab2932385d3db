import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { canActorEdit, listMachines } from '../machines/machines.service';
import type { Actor } from '~/lib/auth/types';

/**
 * The pages a device keeps for working without a network after one visit: home, the machine list, the
 * waiting-to-send list, and for each machine the rider may write to its page, drain card and oil-change form.
 */
export async function listPagesToKeep(db: Kysely<Database>, actor: Actor): Promise<string[]> {
  const machines = await listMachines(db, actor);
  const pages = ['/', '/machines', '/outbox'];
  for (const m of machines) {
    pages.push(`/machines/${m.id}`);
    if (canActorEdit(actor, m)) pages.push(`/machines/${m.id}/drain-card`, `/machines/${m.id}/oil-change`);
  }
  return pages;
}
