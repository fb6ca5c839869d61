import { engineAssumptions, type EngineAssumptions } from '../../src/case/assumptions';
import type { CaseAssumptions } from '../../src/case/schema';

/** What the live readout assumes: the case's own assumptions, else the case model's defaults. */
export type LiveAssumptions = EngineAssumptions;

/** Until a snap says better (common practice: about the width of an anti-aliased edge). */
export const DEFAULT_EDGE_SIGMA_PX = 0.7;

export function liveAssumptionsFor(a: CaseAssumptions | undefined): LiveAssumptions {
  return engineAssumptions(a);
}
