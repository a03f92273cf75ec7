/**
 * The Designs page's computation, pure: candidate designs with their operating characteristics,
 * and the numbers of a chosen design. It runs in a worker thread (candidates-pool.ts), so it takes
 * and returns plain data only.
 */
import { InputError } from '../http/errors.js';
import { operatingCharacteristics, simonDesigns, singleStageDesign, StatsInputError, type OperatingPoint } from '../stats/index.js';
import { NMAX_LIMIT, type DesignSettingsInput, type Selection } from './designs.schema.js';

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

export type CandidateDesign = DesignNumbers & {
  /** Stable within one answer: 'single_stage', 'optimal', 'minimax', 'admissible-<index>'. */
  key: string;
  selection: Selection;
  admissibleIndex: number | null;
  label: string;
  qFrom: number | null;
  qTo: number | null;
  /** An admissible design that is also the optimal or the minimax design. */
  sameAs: 'optimal' | 'minimax' | null;
  curve: OperatingPoint[];
};

export type DesignCandidates = {
  settings: DesignSettingsInput;
  grid: number[];
  singleStage: CandidateDesign | null;
  /** Why there is no single-stage design within nmax, when there is none. */
  singleStageNote: string | null;
  optimal: CandidateDesign;
  minimax: CandidateDesign;
  admissible: CandidateDesign[];
};

/** True response rates for the charts: 0 to a little past p1, in steps of 0.01, with p0 and p1 exactly. */
export function responseGrid(p0: number, p1: number): number[] {
  const top = Math.min(100, Math.ceil((p1 + 0.3) * 100));
  const points = new Set<number>(Array.from({ length: top + 1 }, (_, i) => i / 100));
  points.add(p0);
  points.add(p1);
  return [...points].sort((a, b) => a - b);
}

/** P(X > r) for X ~ Bin(n, p), through the engine, with the ends that need no computation. */
function upperTail(r: number, n: number, p: number): number {
  if (r < 0) return 1;
  if (r >= n) return 0;
  return operatingCharacteristics({ r, n }, [p])[0].probPromising;
}

/**
 * Power of the most powerful (randomised) level-α test with n patients. No design of at most n
 * patients, single- or two-stage, can do better (Neyman–Pearson), so when this falls short the
 * settings are infeasible and the exhaustive search need not run at all.
 */
export function bestPossiblePower(n: number, p0: number, p1: number, alpha: number): number {
  let low = -1;
  let high = n;
  while (high - low > 1) {
    const mid = Math.floor((low + high) / 2);
    if (upperTail(mid, n, p0) <= alpha) high = mid;
    else low = mid;
  }
  const r = high;
  const atR0 = upperTail(r, n, p0);
  const gamma = (alpha - atR0) / (upperTail(r - 1, n, p0) - atR0);
  const atR1 = upperTail(r, n, p1);
  return atR1 + gamma * (upperTail(r - 1, n, p1) - atR1);
}

function requireFeasible(settings: DesignSettingsInput): void {
  const { p0, p1, alpha, beta, nmax } = settings;
  const best = bestPossiblePower(nmax, p0, p1, alpha);
  if (best >= 1 - beta) return;
  const more = nmax < NMAX_LIMIT ? `Allow more patients (up to ${NMAX_LIMIT} here), or revisit p1, α or β.` : 'Revisit p1, α or β.';
  const message = `No design with at most ${nmax} patients reaches power ${+(1 - beta).toFixed(4)} at α ${alpha}: even the most powerful test with ${nmax} patients has power ${best.toFixed(3)}. ${more}`;
  throw new InputError(message, { nmax: message });
}

const LABELS: Record<Selection, string> = {
  single_stage: 'Single-stage',
  optimal: 'Optimal',
  minimax: 'Minimax',
  admissible: 'Admissible',
};

const sameRule = (a: DesignNumbers, b: DesignNumbers) => a.r1 === b.r1 && a.n1 === b.n1 && a.r === b.r && a.n === b.n;

export function curveFor(design: DesignNumbers, grid: number[]): OperatingPoint[] {
  const rule = design.r1 === null || design.n1 === null ? { r: design.r, n: design.n } : { r1: design.r1, n1: design.n1, r: design.r, n: design.n };
  return operatingCharacteristics(rule, grid);
}

/** The single-stage design and the optimal, minimax and admissible two-stage designs, with their curves. */
export function designCandidates(settings: DesignSettingsInput): DesignCandidates {
  requireFeasible(settings);
  const simon = simonDesigns(settings);
  let single: DesignNumbers | null = null;
  let singleStageNote: string | null = null;
  try {
    const s = singleStageDesign(settings);
    single = { r1: null, n1: null, r: s.r, n: s.n, en0: s.n, pet0: 0, typeIError: s.typeIError, power: s.power };
  } catch (error) {
    // Discreteness can let a two-stage design fit within nmax where the single-stage one does not.
    if (!(error instanceof StatsInputError) || error.field !== 'nmax') throw error;
    singleStageNote = error.message;
  }
  const grid = responseGrid(settings.p0, settings.p1);
  const build = (numbers: DesignNumbers, selection: Selection, extra: Partial<CandidateDesign> = {}): CandidateDesign => ({
    ...numbers,
    key: selection,
    selection,
    admissibleIndex: null,
    label: LABELS[selection],
    qFrom: null,
    qTo: null,
    sameAs: null,
    curve: curveFor(numbers, grid),
    ...extra,
  });
  const optimal = build(simon.optimal, 'optimal');
  const minimax = build(simon.minimax, 'minimax');
  const admissible = simon.admissible.map(({ qFrom, qTo, ...numbers }, index) =>
    build(numbers, 'admissible', {
      key: `admissible-${index}`,
      admissibleIndex: index,
      label: `Admissible, q ${qFrom.toFixed(2)}–${qTo.toFixed(2)}`,
      qFrom,
      qTo,
      sameAs: sameRule(numbers, optimal) ? 'optimal' : sameRule(numbers, minimax) ? 'minimax' : null,
    }),
  );
  return {
    settings,
    grid,
    singleStage: single && build(single, 'single_stage'),
    singleStageNote,
    optimal,
    minimax,
    admissible,
  };
}

/** The numbers of the chosen design, recomputed from the settings. */
export function chosenDesign(settings: DesignSettingsInput, selection: Selection, admissibleIndex?: number | null): DesignNumbers {
  requireFeasible(settings);
  if (selection === 'single_stage') {
    const s = singleStageDesign(settings);
    return { r1: null, n1: null, r: s.r, n: s.n, en0: s.n, pet0: 0, typeIError: s.typeIError, power: s.power };
  }
  const simon = simonDesigns(settings);
  if (selection === 'optimal') return simon.optimal;
  if (selection === 'minimax') return simon.minimax;
  const index = admissibleIndex ?? -1;
  const picked = simon.admissible[index];
  if (!picked) {
    const message = `There are ${simon.admissible.length} admissible designs for these settings; choose one of them.`;
    throw new InputError(message, { admissibleIndex: message });
  }
  const { qFrom: _qFrom, qTo: _qTo, ...numbers } = picked;
  return numbers;
}

