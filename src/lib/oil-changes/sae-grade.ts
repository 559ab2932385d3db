/**
 * SAE J300 engine-oil grade names. J300 defines winter grades 0W, 5W, 10W, 15W, 20W, 25W and
 * high-temperature grades 8, 12, 16, 20, 30, 40, 50, 60; a multigrade names one of each (xW-y).
 * Sumpwise also requires the high-temperature number to exceed the winter number, so a reversed or
 * nonsensical name such as 25W-20 or 20W-20 is refused.
 */

/** SAE J300 winter grades (the number before W). */
export const SAE_WINTER_GRADES = [0, 5, 10, 15, 20, 25] as const;
/** SAE J300 high-temperature grades. */
export const SAE_HIGH_GRADES = [8, 12, 16, 20, 30, 40, 50, 60] as const;

/** Longest grade text read; "SAE 10W-40" is 10 characters (common practice, no published source). */
export const MAX_SAE_GRADE_TEXT = 40;

export type SaeGradeResult = { ok: true; grade: string } | { ok: false; message: string };

/** Parses a grade as typed ('10w40', 'SAE 10W-40', '30', '15W') into its J300 spelling, or says why not. */
export function parseSaeGrade(input: string): SaeGradeResult {
  if (input.length > MAX_SAE_GRADE_TEXT) {
    return {
      ok: false,
      message: `An SAE grade name is short, such as 10W-40; this entry has ${input.length} characters.`,
    };
  }
  // Spaces go first, so the pattern has no two neighbouring quantifiers that match the same text (linear time).
  const text = input.toUpperCase().replace(/\s+/g, '').replace(/^SAE/, '');
  if (text === '') return { ok: false, message: 'Enter the SAE grade printed on the oil, such as 10W-40.' };
  const m = /^(?:(\d{1,2})W)?[-–]?(\d{1,2})?$/.exec(text);
  if (!m || (m[1] === undefined && m[2] === undefined)) {
    return { ok: false, message: `“${input.trim()}” is not an SAE grade name; write it like 10W-40, 20W-50 or 30.` };
  }
  const winter = m[1] === undefined ? undefined : Number(m[1]);
  const high = m[2] === undefined ? undefined : Number(m[2]);
  if (winter !== undefined && !(SAE_WINTER_GRADES as readonly number[]).includes(winter)) {
    return { ok: false, message: `${winter}W is not an SAE winter grade (0W, 5W, 10W, 15W, 20W, 25W).` };
  }
  if (high !== undefined && !(SAE_HIGH_GRADES as readonly number[]).includes(high)) {
    return { ok: false, message: `${high} is not an SAE high-temperature grade (8, 12, 16, 20, 30, 40, 50, 60).` };
  }
  if (winter !== undefined && high !== undefined) {
    if (high <= winter) {
      return { ok: false, message: `In ${winter}W-${high} the second number must be higher than the first.` };
    }
    return { ok: true, grade: `${winter}W-${high}` };
  }
  return { ok: true, grade: winter !== undefined ? `${winter}W` : String(high) };
}

/** True when the text is an SAE J300 grade name. */
export function isSaeGrade(input: string): boolean {
  return parseSaeGrade(input).ok;
}
