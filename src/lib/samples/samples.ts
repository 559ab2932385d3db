import { z } from 'zod';
import type { SampleRow } from '../db/database';
import { optionalNumber, pastDay, requiredNumber, text } from '~/lib/http/form-values';
import { clientKeySchema } from '../offline/client-key';

/** Where a sample bottle is, in the order it gets there. */
export const SAMPLE_STATES = ['drawn', 'shipped', 'results_in', 'reviewed'] as const;
export type SampleState = (typeof SAMPLE_STATES)[number];
export const STATE_LABELS: Record<SampleState, string> = {
  drawn: 'Drawn',
  shipped: 'Shipped',
  results_in: 'Results in',
  reviewed: 'Reviewed',
};
export const DRAW_METHODS = ['midstream', 'pump', 'valve'] as const;
export const DRAW_METHOD_LABELS: Record<(typeof DRAW_METHODS)[number], string> = {
  midstream: 'Mid-stream at drain',
  pump: 'Pump (through the dipstick or filler)',
  valve: 'Sampling valve',
};

/** A sample as screens use it; odometer and distance in the stored unit (km or h). */
export interface Sample {
  id: string;
  crewId: string;
  machineId: string;
  oilChangeId: string | null;
  bottleCode: string;
  bottleCodeNorm: string;
  issuedCode: boolean;
  drawnOn: string;
  odometer: number;
  distanceOnOil: number | null;
  topUpL: number;
  saeGrade: string | null;
  oilProduct: string;
  drawMethod: (typeof DRAW_METHODS)[number];
  state: SampleState;
  trackingNote: string;
  createdAt: Date;
}

/** Maps a samples row to the domain shape. */
export function toSample(r: SampleRow): Sample {
  return {
    id: r.id,
    crewId: r.crew_id,
    machineId: r.machine_id,
    oilChangeId: r.oil_change_id,
    bottleCode: r.bottle_code,
    bottleCodeNorm: r.bottle_code_norm,
    issuedCode: r.issued_code,
    drawnOn: r.drawn_on,
    odometer: r.odometer,
    distanceOnOil: r.distance_on_oil,
    topUpL: r.top_up_l,
    saeGrade: r.sae_grade,
    oilProduct: r.oil_product,
    drawMethod: r.draw_method,
    state: r.state,
    trackingNote: r.tracking_note,
    createdAt: r.created_at,
  };
}

/** The drain card, as a form post or as the JSON the offline queue sends; odometer in the machine's unit. */
export const drainCardSchema = z.object({
  bottleCode: text(40, 'bottle code').pipe(z.string().min(1, 'Enter the code on the bottle, or issue one.')),
  codeSource: z
    .enum(['kit', 'issued'], { error: 'Say whether the code is the lab kit’s or one Sumpwise issued.' })
    .default('kit'),
  drawnOn: pastDay('date drawn'),
  odometer: requiredNumber('odometer reading').pipe(z.number().min(0, 'The odometer cannot be negative.')),
  topUpL: optionalNumber('top-up').pipe(
    z.number().min(0, 'The top-up cannot be negative.').lt(40, 'The top-up must be under 40 L.').optional(),
  ),
  saeGrade: text(20, 'grade'),
  oilProduct: text(120, 'oil product'),
  drawMethod: z.enum(DRAW_METHODS, { error: 'Choose how the sample was drawn.' }).default('midstream'),
  clientKey: clientKeySchema,
});
export type DrainCardInput = z.infer<typeof drainCardSchema>;

/** Marking a sample shipped: an optional tracking note. */
export const shipSchema = z.object({ trackingNote: text(200, 'tracking note') });
