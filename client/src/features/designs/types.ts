/** The Designs page's records as the server sends them. */
import type { OperatingPoint } from '../../../../server/stats/index';
import type { CandidateDesign, DesignCandidates, DesignNumbers } from '../../../../server/designs/candidates';
import type { DesignSettingsInput, Selection } from '../../../../server/designs/designs.schema';
import type { DesignVersion, SignedBy } from '../../../../server/designs/designs.repository';
import type { CohortDesigns } from '../../../../server/designs/designs.service';

export type { CandidateDesign, CohortDesigns, DesignCandidates, DesignNumbers, DesignVersion, OperatingPoint, Selection, SignedBy };

export type DesignSettings = DesignSettingsInput;

/** Every candidate once, in the order the table lists them (admissible designs equal to optimal or minimax are left out). */
export function candidateList(c: DesignCandidates): CandidateDesign[] {
  return [...(c.singleStage ? [c.singleStage] : []), c.optimal, c.minimax, ...c.admissible.filter((a) => !a.sameAs)];
}

export const ruleText = (d: { r1: number | null; n1: number | null; r: number; n: number }) =>
  d.r1 === null || d.n1 === null ? `${d.r}/${d.n}` : `${d.r1}/${d.n1}, ${d.r}/${d.n}`;

export { SELECTION_LABELS } from '../../../../server/words';
