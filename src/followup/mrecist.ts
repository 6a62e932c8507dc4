import type { Vec3 } from '../geometry/mat4.js';
import { distance } from '../geometry/vec3.js';
import { MEASURABLE_MIN_MM, selectTargets, targetCategory, type TargetCandidate, type TargetCategory, type TargetSums } from './recist.js';

/**
 * mRECIST for hepatocellular carcinoma (Lencioni and Llovet, Semin Liver Dis 2010;30:52-60): the
 * RECIST arithmetic applied to the longest diameter of viable tumour — the part that enhances in the
 * arterial phase — so necrosis after ablation or embolisation counts as response.
 *
 * - Targets: measurable lesions (RECIST size rule on the whole lesion) whose viable part is itself
 *   measurable (at least 10 mm; "can be accurately measured in at least one dimension as 1 cm or more
 *   and shows intratumoral arterial enhancement", from memory), largest viable diameter first, at most
 *   two in the liver. A tiny enhancing focus in a large necrotic lesion does not make it a target.
 * - CR: no viable tumour left in any target; PR: viable sum at least 30% under baseline; PD: at
 *   least 20% over the smallest viable sum so far, with no absolute floor as published; a protocol may
 *   add one (`mrecistPdFloorMm`), and that is then named as a departure.
 * - Non-target CR: loss of arterial enhancement in every non-target, so a present non-target with no
 *   viable tumour counts as gone.
 * - New intrahepatic lesion: counts when at least 1 cm and enhancing (the typical vascular pattern);
 *   smaller or non-enhancing ones are equivocal until they reach 1 cm or a reader calls them.
 * - Viable diameters come from marks (`viableAxialMm`) or from a viable-tumour mask, whose connected
 *   components are given to the lesion whose extent holds them (the longest viable focus counts). A
 *   component's diameter is the longest axial segment that stays inside it (`longestInsideAxial`),
 *   so a segment never crosses a necrotic centre: an enhancing rim is not the lesion's full width.
 */

/** Least viable diameter of an mRECIST target, and of a new lesion that counts (mm). */
export const MRECIST_MIN_VIABLE_MM = MEASURABLE_MIN_MM;
/** A viable focus may sit this far outside its lesion's measured extent (mask edges, partial volume). */
export const VIABLE_TOLERANCE_MM = 3;

/** mRECIST target category: RECIST arithmetic on viable sums; `pdFloorMm` null is the published rule. */
export function mrecistTargetCategory(s: TargetSums, pdFloorMm: number | null = null): TargetCategory {
  return targetCategory(s, pdFloorMm ?? 0);
}

export interface ViableCandidate extends TargetCandidate {
  /** Viable diameter at baseline; null when unknown. */
  viableMm: number | null;
}

/** Default mRECIST targets: measurable, with a measurable viable part, largest viable diameter first. */
export function selectViableTargets(candidates: readonly ViableCandidate[]): string[] {
  return selectTargets(
    candidates.map((c) => ({ id: c.id, longestMm: c.viableMm ?? 0, measurable: c.measurable && (c.viableMm ?? 0) >= MRECIST_MIN_VIABLE_MM - 1e-6 })),
  );
}

/**
 * Whether a new lesion counts under mRECIST without a reader's call: at least 1 cm and enhancing.
 * With no viable measure at the visit the enhancement is unknown and size alone decides.
 */
export function mrecistNewLesionCounts(longestMm: number, viableMm: number | null): boolean {
  return longestMm >= MRECIST_MIN_VIABLE_MM - 1e-6 && (viableMm === null || viableMm > 0);
}

export interface ViableComponent {
  centroidMm: Vec3;
  /** Longest axial segment inside the component (not crossing necrosis), mm. */
  viableAxialMm: number;
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
    else viable.set(best, Math.max(viable.get(best) ?? 0, c.viableAxialMm));
  }
  return { viable, unassigned };
}
