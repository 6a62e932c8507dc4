import { badInput } from '../errors.js';

// Ranges wide enough for any adult on an operating list, narrow enough to catch metres given as
// centimetres or pounds given as kilograms. Both formulas below were derived in adults.
const HEIGHT_CM = { min: 100, max: 250 };
const WEIGHT_KG = { min: 25, max: 350 };
// What the height and weight ranges above allow, with a little room.
const BSA_M2 = { min: 0.8, max: 5 };

/**
 * Body surface area in m² by Mosteller's formula, √(height cm × weight kg / 3600)
 * (Mosteller RD, N Engl J Med 1987;317:1098).
 */
export function bodySurfaceAreaM2(heightCm: number, weightKg: number): number {
  checkRange('height', heightCm, HEIGHT_CM, 'cm', 'give the height in centimetres');
  checkRange('weight', weightKg, WEIGHT_KG, 'kg', 'give the weight in kilograms');
  return Math.sqrt((heightCm * weightKg) / 3600);
}

/**
 * Standardised total liver volume in mL from body surface area:
 * TLV = −794.41 + 1267.28 × BSA (Vauthey JN et al., Liver Transpl 2002;8:233-240).
 * It is the denominator of the standardised remnant, so a remnant is judged against the liver this
 * body size would be expected to carry rather than against a liver swollen or shrunk by disease.
 */
export function standardisedLiverVolumeMl(bsaM2: number): number {
  checkRange('body surface area', bsaM2, BSA_M2, 'm²', 'check the height and weight it came from');
  return -794.41 + 1267.28 * bsaM2;
}

function checkRange(what: string, value: number, range: { min: number; max: number }, unit: string, hint: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw badInput(what, `must be a positive number in ${unit}, got ${String(value)}`);
  }
  if (value < range.min || value > range.max) {
    throw badInput(what, `${value} ${unit} is outside the plausible ${range.min}–${range.max} ${unit}; ${hint}`);
  }
}
