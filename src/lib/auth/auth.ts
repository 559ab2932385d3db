import { z } from 'zod';
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from './password';
import { isTimeZone } from '../words/dates';

// Input schemas shared by the HTML forms and the JSON endpoints. Objects are strict: a body that carries a
// role or a crew id nobody asked for is refused rather than silently trusted.

export const emailSchema = z
  .string({ error: 'Enter your e-mail address.' })
  .trim()
  .toLowerCase()
  .min(1, 'Enter your e-mail address.')
  .max(254, 'That e-mail address is too long.')
  .pipe(z.email('Enter an e-mail address like name@example.com.'));

export const newPasswordSchema = z
  .string({ error: 'Choose a password.' })
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters.`)
  .max(PASSWORD_MAX_LENGTH, `Use at most ${PASSWORD_MAX_LENGTH} characters.`);

/** Sign-in takes any string as the password: length rules apply to new passwords only. */
const anyPasswordSchema = z
  .string({ error: 'Enter your password.' })
  .min(1, 'Enter your password.')
  .max(1024, 'That password is too long.');

export const displayNameSchema = z.string().trim().max(80, 'Use at most 80 characters.');

/**
 * The zone a browser reports in a hidden field at sign-up and sign-in. Nobody typed it, so a value the runtime
 * does not know is dropped (the user can choose one on the account page) rather than refused.
 */
const browserTimeZoneSchema = z
  .string()
  .max(100_000)
  .transform((v) => (isTimeZone(v) ? v : undefined))
  .optional();

/** A zone chosen on the account page: an IANA name the runtime knows. */
export const timeZoneSchema = z
  .string({ error: 'Choose a time zone.' })
  .refine(isTimeZone, 'Choose a time zone from the list, such as Europe/London.');

export const signUpSchema = z.strictObject({
  email: emailSchema,
  password: newPasswordSchema,
  displayName: displayNameSchema.optional(),
  invitation: z.string().max(200).optional(),
  timeZone: browserTimeZoneSchema,
});
export type SignUpInput = z.infer<typeof signUpSchema>;

export const signInSchema = z.strictObject({
  email: emailSchema,
  password: anyPasswordSchema,
  timeZone: browserTimeZoneSchema,
});
export type SignInInput = z.infer<typeof signInSchema>;

export const changePasswordSchema = z.strictObject({
  currentPassword: anyPasswordSchema,
  newPassword: newPasswordSchema,
});
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;

export const requestResetSchema = z.strictObject({ email: emailSchema });

export const resetPasswordSchema = z.strictObject({ token: z.string().min(1).max(200), password: newPasswordSchema });

export const unitsSchema = z.strictObject({
  distanceUnit: z.enum(['mi', 'km'], 'Choose miles or kilometres.'),
  lengthUnit: z.enum(['in', 'mm'], 'Choose inches or millimetres.'),
  temperatureUnit: z.enum(['F', 'C'], 'Choose °F or °C.'),
  timeZone: timeZoneSchema.optional(),
  displayName: displayNameSchema.min(1, 'Enter a name.').optional(),
});
export type UnitsInput = z.infer<typeof unitsSchema>;
