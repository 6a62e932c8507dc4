import { describe, expect, it } from 'vitest';
import { FalciformError } from '../../src/errors.js';
import { bodySurfaceAreaM2, standardisedLiverVolumeMl } from '../../src/remnant/body.js';

describe('body surface area (source: Mosteller, N Engl J Med 1987;317:1098: BSA = √(height cm × weight kg / 3600))', () => {
  it('worked numbers', () => {
    // 170 cm, 70 kg: 170 × 70 = 11900; 11900 / 3600 = 3.30556; √3.30556 = 1.81812 m².
    expect(bodySurfaceAreaM2(170, 70)).toBeCloseTo(1.81812, 5);
    // 180 cm, 90 kg: 16200 / 3600 = 4.5; √4.5 = 2.12132 m².
    expect(bodySurfaceAreaM2(180, 90)).toBeCloseTo(2.12132, 5);
    // 160 cm, 50 kg: 8000 / 3600 = 2.22222; √2.22222 = 1.49071 m².
    expect(bodySurfaceAreaM2(160, 50)).toBeCloseTo(1.49071, 5);
  });

  it('refuses missing, non-positive and implausible values with the unit to use', () => {
    expect(() => bodySurfaceAreaM2(1.7, 70)).toThrow(/height: 1.7 cm is outside the plausible 100–250 cm; give the height in centimetres/);
    expect(() => bodySurfaceAreaM2(170, 0)).toThrow(/weight: must be a positive number in kg/);
    expect(() => bodySurfaceAreaM2(170, -70)).toThrow(FalciformError);
    expect(() => bodySurfaceAreaM2(Number.NaN, 70)).toThrow(/height: must be a positive number/);
    expect(() => bodySurfaceAreaM2(170, Infinity)).toThrow(FalciformError);
    expect(() => bodySurfaceAreaM2(170, 700)).toThrow(/give the weight in kilograms/);
  });
});

describe('standardised total liver volume (source: Vauthey et al., Liver Transpl 2002;8:233-240: TLV = −794.41 + 1267.28 × BSA)', () => {
  it('worked numbers', () => {
    // BSA 1.81812 m² (170 cm, 70 kg): 1267.28 × 1.81812 = 2304.07; − 794.41 = 1509.66 mL.
    expect(standardisedLiverVolumeMl(bodySurfaceAreaM2(170, 70))).toBeCloseTo(1509.66, 1);
    // BSA 2.12132 m² (180 cm, 90 kg): 1267.28 × 2.12132 = 2688.31; − 794.41 = 1893.90 mL.
    expect(standardisedLiverVolumeMl(bodySurfaceAreaM2(180, 90))).toBeCloseTo(1893.9, 1);
    // BSA 2.0 m² exactly: 2534.56 − 794.41 = 1740.15 mL.
    expect(standardisedLiverVolumeMl(2)).toBeCloseTo(1740.15, 6);
  });

  it('refuses a body surface area no adult has', () => {
    expect(() => standardisedLiverVolumeMl(0)).toThrow(FalciformError);
    expect(() => standardisedLiverVolumeMl(0.5)).toThrow(/body surface area: 0.5 m² is outside/);
    expect(() => standardisedLiverVolumeMl(18)).toThrow(FalciformError);
  });
});
