/** The Designs page's records as the server sends them. */
import type { BryantDayDesign, OperatingPoint, ToxicityOperatingPoint } from '../../../../server/stats/index';
import type { BoundaryWithCurve, BryantDayGrid } from '../../../../server/designs/safety-candidates';
import type { CandidateDesign, DesignCandidates, DesignNumbers } from '../../../../server/designs/candidates';
import type { DesignSettingsInput, Selection } from '../../../../server/designs/designs.schema';
import type { DesignVersion, SignedBy } from '../../../../server/designs/designs.repository';
import { SELECTION_LABELS } from '../../../../server/words';
import type { CohortDesigns } from '../../../../server/designs/designs.service';

export type { BoundaryWithCurve, BryantDayDesign, BryantDayGrid, CandidateDesign, CohortDesigns, DesignCandidates, DesignNumbers, DesignVersion, OperatingPoint, Selection, SignedBy, ToxicityOperatingPoint };

export type BryantDayDesigns = { optimal: BryantDayDesign; minimax: BryantDayDesign };

export type DesignSettings = DesignSettingsInput;

/** Every candidate once, in the order the table lists them (admissible designs equal to optimal or minimax are left out). */
export function candidateList(c: DesignCandidates): CandidateDesign[] {
  return [...(c.singleStage ? [c.singleStage] : []), c.optimal, c.minimax, ...c.admissible.filter((a) => !a.sameAs)];
}

export const ruleText = (d: { r1: number | null; n1: number | null; r: number; n: number }) =>
  d.r1 === null || d.n1 === null ? `${d.r}/${d.n}` : `${d.r1}/${d.n1}, ${d.r}/${d.n}`;

/** A Bryant–Day design as a candidate the page compares and signs (the expected sizes under its two null scenarios stand for EN0). */
export function bryantDayCandidates(found: BryantDayDesigns): Array<CandidateDesign & { bryantDay: BryantDayDesign }> {
  return (['optimal', 'minimax'] as const).map((selection) => {
    const d = found[selection];
    return {
      key: `bryant-day-${selection}`,
      selection,
      admissibleIndex: null,
      label: selection === 'optimal' ? 'Bryant–Day optimal' : 'Bryant–Day minimax',
      r1: d.r1,
      n1: d.n1,
      r: d.r,
      n: d.n,
      en0: d.expectedN.poorResponse,
      pet0: Number.NaN,
      typeIError: d.alphaR,
      power: d.power,
      qFrom: null,
      qTo: null,
      sameAs: null,
      curve: [],
      bryantDay: d,
    };
  });
}

/** A design version's name: Simon's, or Bryant–Day's when its safety rule is one. */
export const designLabel = (d: { selection: Selection; safetyRule?: string }) =>
  d.safetyRule === 'bryant_day' ? (d.selection === 'minimax' ? 'Bryant–Day minimax' : 'Bryant–Day optimal') : SELECTION_LABELS[d.selection];

export { SELECTION_LABELS } from '../../../../server/words';
