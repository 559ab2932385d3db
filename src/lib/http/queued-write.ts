import type { CrewMembership } from '../auth/types';
import { jsonError } from './json';

/** The header a write sent from a device's offline queue carries: the crew it was written in. */
export const QUEUED_CREW_HEADER = 'x-sumpwise-crew';

/**
 * A queued write belongs to the crew it was made in. When the session now works in another crew, the
 * write is refused (409, nothing written) with a sentence, instead of landing in the wrong crew; a plain
 * request without the header is not affected.
 */
export function refuseQueuedWriteOfOtherCrew(
  request: Request,
  crew: CrewMembership,
  crews: readonly CrewMembership[],
): Response | null {
  const wanted = request.headers.get(QUEUED_CREW_HEADER);
  if (!wanted || wanted === crew.crewId) return null;
  const other = crews.find((c) => c.crewId === wanted);
  return other
    ? jsonError(409, 'other_crew', `This was saved in ${other.crewName}; switch to that crew and it will be sent.`)
    : jsonError(
        409,
        'not_a_member',
        'This was saved in a crew you are no longer a member of, so it cannot be sent. Keep a copy of it, then discard it.',
      );
}
