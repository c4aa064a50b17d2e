import { MM_PER_INCH, type LengthUnit } from '@/domain/words';

// Written once, with the engine's stories (src/domain/words.ts).
export { formatLength, fromMm, MM_PER_INCH, type LengthUnit } from '@/domain/words';

/** A typed value in the display unit back to millimetres (0.1 mm resolution). */
export function toMm(value: number, unit: LengthUnit): number {
  return unit === 'mm' ? value : Math.round(value * MM_PER_INCH * 10) / 10;
}

/** One stepper press: 1 mm or 0.1 in. */
export const STEP: Record<LengthUnit, number> = { mm: 1, in: 0.1 };
