/**
 * A page's 403 in the app's own design: the request is rewritten to /forbidden, which explains what the
 * visitor's role may not do. Reasons are a fixed list, so nothing from the request is echoed on the page.
 */
export const FORBIDDEN_REASONS = {
  'add-machine': 'Your role in this crew does not add machines: a lead or a rider adds them.',
  'edit-machine':
    'Only the machine’s rider or a crew lead changes this machine, logs its oil changes, registers its samples and records its wear parts.',
  'import-lab-report': 'Only the crew’s lead or a mechanic imports lab reports.',
  'edit-limits': 'Only a lead of this crew changes its alert limits.',
} as const;

export type ForbiddenReason = keyof typeof FORBIDDEN_REASONS;

/** The explanation for a reason key, or a general one for anything else. */
export function explainForbidden(reason: string | null): string {
  return reason !== null && Object.hasOwn(FORBIDDEN_REASONS, reason)
    ? FORBIDDEN_REASONS[reason as ForbiddenReason]
    : 'Your role in this crew does not allow this.';
}

/** Renders the 403 page in place of the current one. */
export function forbiddenPage(
  astro: { rewrite: (to: string) => Promise<Response> },
  reason: ForbiddenReason,
): Promise<Response> {
  return astro.rewrite(`/forbidden?reason=${reason}`);
}
