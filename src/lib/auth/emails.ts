import { renderMailLayout } from '../mail/templates';

/** A message's words, ready for queueMail. */
export interface MailText {
  subject: string;
  text: string;
  html: string;
}

/** The message that confirms an address belongs to the person who signed up. */
export function composeVerificationEmail(input: { displayName: string; url: string; validHours: number }): MailText {
  const subject = 'Confirm your e-mail address for Sumpwise';
  return {
    subject,
    ...renderMailLayout({
      title: 'Confirm your e-mail address',
      intro: `Hello ${input.displayName}, please confirm that this address is yours so Sumpwise can send you sample reminders and crew invitations.`,
      paragraphs: [`The link works once and for ${input.validHours} hours.`],
      action: { label: 'Confirm my address', url: input.url },
    }),
  };
}

/** The message with a single-use link to choose a new password. */
export function composePasswordResetEmail(input: { displayName: string; url: string; validMinutes: number }): MailText {
  const subject = 'Choose a new Sumpwise password';
  return {
    subject,
    ...renderMailLayout({
      title: 'Choose a new password',
      intro: `Hello ${input.displayName}, someone (hopefully you) asked to reset the password of this Sumpwise account.`,
      paragraphs: [
        `The link works once and for ${input.validMinutes} minutes. Setting a new password signs the account out everywhere else.`,
        'If you did not ask for this, you can ignore this message: your password stays as it is.',
      ],
      action: { label: 'Choose a new password', url: input.url },
    }),
  };
}
