/** Sizes are stored in millimetres; a collection may show and accept inches instead. */
export type LengthUnit = 'mm' | 'in';

export const MM_PER_INCH = 25.4;

/** A stored millimetre value in the display unit, rounded for reading (mm: whole; in: 0.1). */
export function fromMm(mm: number, unit: LengthUnit): number {
  return unit === 'mm' ? Math.round(mm) : Math.round((mm / MM_PER_INCH) * 10) / 10;
}

/** A typed value in the display unit back to millimetres (0.1 mm resolution). */
export function toMm(value: number, unit: LengthUnit): number {
  return unit === 'mm' ? value : Math.round(value * MM_PER_INCH * 10) / 10;
}

export function formatLength(mm: number | null | undefined, unit: LengthUnit): string {
  if (mm === null || mm === undefined) return '—';
  return unit === 'mm' ? `${fromMm(mm, unit)} mm` : `${fromMm(mm, unit)} in`;
}

/** One stepper press: 1 mm or 0.1 in. */
export const STEP: Record<LengthUnit, number> = { mm: 1, in: 0.1 };
