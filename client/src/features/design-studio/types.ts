/** The Design studio's records as the server sends them. */
export type OperatingPoint = { p: number; probPromising: number; pet: number; expectedN: number };

export type DesignNumbers = {
  r1: number | null;
  n1: number | null;
  r: number;
  n: number;
  en0: number;
  pet0: number;
  typeIError: number;
  power: number;
};

export type Selection = 'single_stage' | 'optimal' | 'minimax' | 'admissible';

export type CandidateDesign = DesignNumbers & {
  key: string;
  selection: Selection;
  admissibleIndex: number | null;
  label: string;
  qFrom: number | null;
  qTo: number | null;
  sameAs: 'optimal' | 'minimax' | null;
  curve: OperatingPoint[];
};

export type DesignSettings = { p0: number; p1: number; alpha: number; beta: number; nmax: number };

export type DesignCandidates = {
  settings: DesignSettings;
  grid: number[];
  singleStage: CandidateDesign | null;
  singleStageNote: string | null;
  optimal: CandidateDesign;
  minimax: CandidateDesign;
  admissible: CandidateDesign[];
};

export type SignedBy = {
  id: string;
  signerEmail: string;
  signerName: string | null;
  meaning: string;
  subjectType: string;
  contentHash: string;
  authenticatedAt: string;
  signedAt: string;
};

export type DesignVersion = DesignSettings & {
  id: string;
  cohortId: string;
  version: number;
  selection: Selection;
  r1: number | null;
  n1: number | null;
  r: number;
  n: number;
  en0: number | null;
  pet0: number | null;
  typeIError: number;
  power: number;
  analysisPopulation: 'all_enrolled' | 'evaluable';
  interimAccrual: 'pause' | 'continue_at_risk';
  sponsorSeesResponse: boolean;
  protocolReference: string | null;
  amendmentReason: string | null;
  createdAt: string;
  signature: SignedBy | null;
};

export type CohortDesigns = {
  id: string;
  code: string;
  name: string;
  position: number;
  status: string;
  stopCategory: string | null;
  stopReason: string | null;
  statusChangedAt: string;
  enrolled: number;
  versions: DesignVersion[];
  currentCurve: OperatingPoint[] | null;
};

/** Every candidate once, in the order the table lists them (admissible designs equal to optimal or minimax are left out). */
export function candidateList(c: DesignCandidates): CandidateDesign[] {
  return [...(c.singleStage ? [c.singleStage] : []), c.optimal, c.minimax, ...c.admissible.filter((a) => !a.sameAs)];
}

export const ruleText = (d: { r1: number | null; n1: number | null; r: number; n: number }) =>
  d.r1 === null || d.n1 === null ? `${d.r}/${d.n}` : `${d.r1}/${d.n1}, ${d.r}/${d.n}`;

export const SELECTION_LABELS: Record<Selection, string> = {
  single_stage: 'Single-stage',
  optimal: 'Simon optimal',
  minimax: 'Simon minimax',
  admissible: 'Admissible',
};
