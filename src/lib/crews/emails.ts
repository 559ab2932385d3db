import type { MailText } from '../auth/emails';
import type { Role } from '../db/database';
import { renderMailLayout } from '../mail/templates';
import { ROLE_HINTS } from './crews';

/** The invitation to join a crew with a role. */
export function composeInvitationEmail(input: {
  crewName: string;
  inviterName: string;
  role: Role;
  url: string;
  validDays: number;
}): MailText {
  const subject = `${input.inviterName} invites you to the crew ${input.crewName} on Sumpwise`;
  return {
    subject: subject.length > 200 ? `You are invited to a crew on Sumpwise` : subject,
    ...renderMailLayout({
      title: `Join ${input.crewName}`,
      intro: `${input.inviterName} invites you to the crew ${input.crewName} as ${input.role}: ${ROLE_HINTS[input.role]}.`,
      paragraphs: [
        `Open the link to accept. If you have no Sumpwise account yet you can create one from there with this address. The link works once and for ${input.validDays} days.`,
      ],
      action: { label: 'See the invitation', url: input.url },
    }),
  };
}
