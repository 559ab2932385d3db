/** The crew overview's one filled button, chosen by state. Pure: no database. */
import { levelRank } from '../levels';
import type { OverviewRow } from './overview';

export interface OverviewPrimary {
  label: string;
  href: string;
}

/**
 * The worst machine on the page (act before watch; the first listed of equals): a reviewer is sent to review its
 * sample while it waits for review, anyone else to its findings. Null when no machine shown is at watch or act;
 * the filter's Apply is then the page's main button.
 */
export function chooseOverviewPrimary(
  rows: readonly Pick<OverviewRow, 'name' | 'worst' | 'lastSample'>[],
  reviewer: boolean,
): OverviewPrimary | null {
  let worst: (typeof rows)[number] | null = null;
  for (const r of rows) {
    if (!r.lastSample || (r.worst !== 'act' && r.worst !== 'watch')) continue;
    if (!worst || levelRank(r.worst) > levelRank(worst.worst!)) worst = r;
  }
  if (!worst?.lastSample) return null;
  const sample = worst.lastSample;
  return reviewer && sample.state === 'results_in'
    ? { label: `Review ${worst.name}`, href: `/samples/${sample.id}#review` }
    : { label: `Findings of ${worst.name}`, href: `/samples/${sample.id}#findings` };
}
