// Live "distance on the oil" hints while an odometer is typed (drain card, oil change). The server computes
// the stored figure; this only reads the form's data-prev-odometer and data-unit and writes one sentence.

/** What the hint says for a typed reading `v` against the previous one `prev` (both finite). */
export type OdometerHintWords = (v: number, prev: number, unit: string) => string;

/** Wires the hint of the first form matching `selector`: on every input, and once at load. */
export function wireOdometerHint(selector: string, words: OdometerHintWords, empty: string): void {
  const form = document.querySelector<HTMLFormElement>(selector);
  if (!form) return;
  const prev = parseFloat(form.getAttribute('data-prev-odometer') ?? '');
  const unit = form.getAttribute('data-unit') ?? '';
  const out = form.querySelector('[data-distance-out]');
  const input = form.querySelector<HTMLInputElement>('input[name=odometer]');
  if (!out || !input || !isFinite(prev)) return;
  const show = (): void => {
    const v = parseFloat(String(input.value).replace(/[,\s]/g, ''));
    out.textContent = isFinite(v) ? words(v, prev, unit) : empty;
  };
  input.addEventListener('input', show);
  show();
}

/** A distance as the hints write it: whole units with thousands separators. */
export const formatHintDistance = (d: number, unit: string): string =>
  `${Math.round(d).toLocaleString('en-US')} ${unit}`;
