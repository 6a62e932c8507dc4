import type { Vec3 } from '../geometry/mat4.js';
import { distance } from '../geometry/vec3.js';
import { PD_MIN_INCREASE_MM, selectTargets, targetCategory, type TargetCandidate, type TargetCategory, type TargetSums } from './recist.js';

/**
 * mRECIST for hepatocellular carcinoma (Lencioni and Llovet, Semin Liver Dis 2010;30:52-60): the
 * RECIST arithmetic applied to the longest diameter of viable tumour — the part that enhances in the
 * arterial phase — so necrosis after ablation or embolisation counts as response.
 *
 * - Targets: measurable lesions (RECIST size rule on the whole lesion) that show viable tumour at
 *   baseline, largest viable diameter first, at most two in the liver.
 * - CR: no viable tumour left in any target; PR: viable sum at least 30% under baseline; PD: at
 *   least 20% over the smallest viable sum so far. The 2010 paper's PD wording (from memory) gives
 *   no absolute floor; Falciform keeps RECIST 1.1's 5 mm floor so both criteria share one set of
 *   thresholds — MRECIST_PD_MIN_INCREASE_MM is the one place to change that.
 * - Viable diameters come from marks (`viableAxialMm`) or from a viable-tumour mask, whose connected
 *   components are given to the lesion whose extent holds them (the longest viable focus counts).
 */

export const MRECIST_PD_MIN_INCREASE_MM = PD_MIN_INCREASE_MM;
/** A viable focus may sit this far outside its lesion's measured extent (mask edges, partial volume). */
export const VIABLE_TOLERANCE_MM = 3;

export function mrecistTargetCategory(s: TargetSums): TargetCategory {
  return targetCategory(s, MRECIST_PD_MIN_INCREASE_MM);
}

export interface ViableCandidate extends TargetCandidate {
  /** Viable diameter at baseline; null when unknown. */
  viableMm: number | null;
}

/** Default mRECIST targets: measurable, with viable tumour, largest viable diameter first. */
export function selectViableTargets(candidates: readonly ViableCandidate[]): string[] {
  return selectTargets(
    candidates.map((c) => ({ id: c.id, longestMm: c.viableMm ?? 0, measurable: c.measurable && (c.viableMm ?? 0) > 0 })),
  );
}

export interface ViableComponent {
  centroidMm: Vec3;
  longestAxialMm: number;
}

/**
 * Viable diameter of each lesion from a viable-tumour mask's components: each component goes to the
 * nearest lesion whose extent (half its longest diameter plus a tolerance) holds the component's
 * centre; a lesion gets its longest component, 0 when none (fully necrotic). Components inside no
 * lesion are counted so the caller can warn.
 */
export function viableFromComponents(
  lesions: readonly { id: string; centroidMm: Vec3; longestAxialMm: number }[],
  components: readonly ViableComponent[],
): { viable: Map<string, number>; unassigned: number } {
  const viable = new Map<string, number>(lesions.map((l) => [l.id, 0]));
  let unassigned = 0;
  for (const c of components) {
    let best: string | null = null;
    let bestD = Infinity;
    for (const l of lesions) {
      const d = distance(c.centroidMm, l.centroidMm);
      if (d <= l.longestAxialMm / 2 + VIABLE_TOLERANCE_MM && d < bestD) {
        bestD = d;
        best = l.id;
      }
    }
    if (best === null) unassigned++;
    else viable.set(best, Math.max(viable.get(best) ?? 0, c.longestAxialMm));
  }
  return { viable, unassigned };
}
