/**
 * Room each crew has for the files it keeps on our side (photos and raw lab files). 500 MB is thousands of
 * lab reports and several hundred phone photos (common practice, no published source); it bounds what one
 * account, or a script signing up crews, can make the server store.
 */
export const CREW_STORAGE_QUOTA_BYTES = 500 * 1024 * 1024;

/** The refusal when a new file would take the crew past its quota, or null when it fits. */
export function checkCrewQuota(
  usedBytes: number,
  addBytes: number,
  quotaBytes = CREW_STORAGE_QUOTA_BYTES,
): string | null {
  if (usedBytes + addBytes <= quotaBytes) return null;
  const mb = (n: number) => `${Math.round(n / (1024 * 1024)).toLocaleString('en-GB')} MB`;
  return `Your crew has used ${mb(usedBytes)} of its ${mb(quotaBytes)} for photos and lab files, so this file was not kept. Delete photos you no longer need, or ask us for more room.`;
}
