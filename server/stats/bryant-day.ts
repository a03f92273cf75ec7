/**
 * Two-stage design for response and toxicity together (Bryant & Day 1995, Biometrics 51:1372–1383).
 *
 * Stage 1 treats n1 patients and stops if responses ≤ r1 or toxicities > t1; otherwise the cohort
 * goes on to n, and the agent is promising if responses > r and toxicities ≤ t. With response and
 * toxicity independent, P(promising | pR, pT) = R(pR) · T(pT) where
 *   R(pR) = P(X1 > r1, X1 + X2 > r | pR)   and   T(pT) = P(Y1 ≤ t1, Y1 + Y2 ≤ t | pT).
 * A design must keep P(promising) ≤ αR at (pR0, acceptable toxicity), ≤ αT at (pR1, unacceptable
 * toxicity), and reach 1 − β at (pR1, acceptable toxicity). The expected size is
 * EN(pR, pT) = n1 + (n − n1) · P(X1 > r1 | pR) · P(Y1 ≤ t1 | pT).
 *
 * - Optimal: least max(EN(pR0, acceptable), EN(pR1, unacceptable)), the larger expected size under the
 *   two null scenarios. Exact ties go to the smaller n, then the smaller n1, the larger r1, the
 *   smaller t1.
 * - Minimax: the smallest n; among its designs, the least of that same objective with the same ties.
 * - For the chosen stage 1, the final cut-offs reported are the smallest r that works, with the
 *   smallest t that then reaches the power (the strictest toxicity rule the power allows).
 * The search covers n ≤ nmax, 1 ≤ n1 < n, 0 ≤ r1 < n1, 0 ≤ t1 < n1 (both stage-1 rules can stop),
 * r1 ≤ r < n, t1 ≤ t < n, exactly.
 *
 * Speed: binomial tables are built once per rate. A size n at which even the Neyman–Pearson test
 * cannot separate the two response rates (or the two toxicity rates) holds no design and is skipped.
 * For each (n1, n) the objective depends on (r1, t1) only: it falls as r1 rises and grows with t1, and
 * P(X1 > r1 | pR1) · P(Y1 ≤ t1 | acceptable) caps the power, so r1 walks down, t1 walks up from the
 * least value that power allows, and the walk stops as soon as the objective cannot beat the best
 * design so far. Only then are the response table R(r1, ·) and the toxicity table T(t1, ·) extended
 * (each row from the one before in n steps), each part checked on its own (its two probabilities
 * must be able to meet α / (1 − β) apart), and the final cut-offs found in one pass: as r rises R
 * falls, so the least t reaching the power only rises.
 *
 * With an odds ratio ψ of association between a patient's response and toxicity,
 * `bryantDayCharacteristics` evaluates a design exactly over the four response × toxicity cells; the
 * cell probabilities follow from the two rates and ψ (Plackett's quadratic).
 */
import { StatsInputError, requireCount, requireOpenUnit, requirePositive } from './errors.js';
import { BinomialRows } from './binomial-table.js';

export interface BryantDaySettings {
  pR0: number;
  pR1: number;
  toxAcceptable: number;
  toxUnacceptable: number;
  alphaR: number;
  alphaT: number;
  beta: number;
  nmax: number;
}

export interface BryantDayRule {
  n1: number;
  r1: number;
  t1: number;
  n: number;
  r: number;
  t: number;
}

export interface BryantDayDesign extends BryantDayRule {
  /** Attained P(promising) at poor response and acceptable toxicity. */
  alphaR: number;
  /** Attained P(promising) at good response and unacceptable toxicity. */
  alphaT: number;
  /** Attained P(promising) at good response and acceptable toxicity. */
  power: number;
  expectedN: { poorResponse: number; highToxicity: number };
}

export interface BryantDayDesigns {
  optimal: BryantDayDesign | null;
  minimax: BryantDayDesign | null;
}

export interface BryantDayScenario {
  pR: number;
  pT: number;
  /** Odds ratio between a patient's response and toxicity; 1 (the default) is independence. */
  oddsRatio?: number;
}

export interface BryantDayPoint {
  pR: number;
  pT: number;
  oddsRatio: number;
  probPromising: number;
  probEarlyStop: number;
  expectedN: number;
}

/**
 * Largest nmax searched, and largest n evaluated. The search grows about as nmax⁴; settings that no
 * design can meet are its worst case, and at 150 those still finish in a few seconds on one core.
 */
export const BRYANT_DAY_NMAX_LIMIT = 150;

/**
 * P(Z1 > s1, Z1 + Z2 > s) for Z1 ~ Bin(n1, q), Z2 ~ Bin(n − n1, q), for every s in 0 … n − 1, one row per
 * s1 built from the row above it: G(s1, s) = G(s1 + 1, s) + P(Z1 = s1 + 1) · P(Z2 > s − s1 − 1).
 * Responses read it at the response rate with (s1, s) = (r1, r); toxicities at the non-toxicity rate
 * 1 − pT with (s1, s) = (n1 − 1 − t1, n − 1 − t), since Y ≤ t exactly when the non-toxic count exceeds
 * n − 1 − t. Rows live in one buffer reused for every (n1, n).
 */
class StageTable {
  private readonly values: Float64Array;
  private n1 = 0;
  private n2 = 0;
  private n = 0;
  /** The lowest s1 whose row is built. */
  private lowest = 0;

  constructor(
    private readonly rows: BinomialRows,
    nmax: number,
  ) {
    this.values = new Float64Array((nmax + 1) * nmax);
  }

  reset(n1: number, n: number): void {
    this.n1 = n1;
    this.n2 = n - n1;
    this.n = n;
    this.lowest = n1;
    this.values.fill(0, n1 * n, (n1 + 1) * n);
  }

  at(s1: number, s: number): number {
    const { n, n1, n2, rows, values } = this;
    for (; this.lowest > s1; this.lowest--) {
      const from = this.lowest * n;
      const to = from - n;
      const z1 = this.lowest;
      const mass = rows.pmf(n1, z1);
      for (let k = 0; k < n; k++) values[to + k] = values[from + k] + mass * rows.sf(n2, k - z1);
    }
    return values[s1 * n + s];
  }
}

interface Found extends BryantDayRule {
  objective: number;
}

function validateSettings(settings: BryantDaySettings): void {
  if (typeof settings !== 'object' || settings === null) {
    throw new StatsInputError('pR0', 'Design settings pR0, pR1, toxAcceptable, toxUnacceptable, alphaR, alphaT, beta and nmax are required.');
  }
  const pR0 = requireOpenUnit('pR0', settings.pR0);
  const pR1 = requireOpenUnit('pR1', settings.pR1);
  const toxAcceptable = requireOpenUnit('toxAcceptable', settings.toxAcceptable);
  const toxUnacceptable = requireOpenUnit('toxUnacceptable', settings.toxUnacceptable);
  const alphaR = requireOpenUnit('alphaR', settings.alphaR);
  const alphaT = requireOpenUnit('alphaT', settings.alphaT);
  const beta = requireOpenUnit('beta', settings.beta);
  if (pR1 <= pR0) {
    throw new StatsInputError('pR1', `pR1 (${pR1}) must be greater than pR0 (${pR0}): the design looks for a better response rate.`);
  }
  if (toxUnacceptable <= toxAcceptable) {
    throw new StatsInputError('toxUnacceptable', `toxUnacceptable (${toxUnacceptable}) must be greater than toxAcceptable (${toxAcceptable}).`);
  }
  if (Math.max(alphaR, alphaT) + beta >= 1) {
    throw new StatsInputError('beta', `alphaR + beta and alphaT + beta must be less than 1 (got ${alphaR}, ${alphaT} and ${beta}); otherwise no trial is needed.`);
  }
  const nmax = requireCount('nmax', settings.nmax, 2);
  if (nmax > BRYANT_DAY_NMAX_LIMIT) {
    throw new StatsInputError('nmax', `nmax (${nmax}) is above ${BRYANT_DAY_NMAX_LIMIT}, the largest Bryant–Day search offered.`);
  }
}

/** Exact search; optimal and minimax are null when no design of at most nmax patients meets the three constraints. */
export function bryantDayDesigns(settings: BryantDaySettings, options: { onProgress?: (fraction: number) => void } = {}): BryantDayDesigns {
  validateSettings(settings);
  const { pR0, pR1, toxAcceptable, toxUnacceptable, alphaR, alphaT, beta, nmax } = settings;
  const power = 1 - beta;
  const poor = new BinomialRows(nmax, pR0);
  const good = new BinomialRows(nmax, pR1);
  const safeA = new BinomialRows(nmax, 1 - toxAcceptable);
  const safeU = new BinomialRows(nmax, 1 - toxUnacceptable);
  const resp0 = new StageTable(poor, nmax);
  const resp1 = new StageTable(good, nmax);
  const toxA = new StageTable(safeA, nmax);
  const toxU = new StageTable(safeU, nmax);

  /** The first final rule (r, t) meeting all three constraints for this stage 1, or null. */
  const finalCutoffs = (n: number, n1: number, r1: number, t1: number): { r: number; t: number } | null => {
    const s1 = n1 - 1 - t1;
    let t = t1;
    for (let r = r1; r < n; r++) {
      const good1 = resp1.at(r1, r);
      while (t < n && good1 * toxA.at(s1, n - 1 - t) < power) t++;
      // R falls as r rises, so once no t reaches the power no larger r will.
      if (t === n) return null;
      const acceptable = toxA.at(s1, n - 1 - t);
      if (resp0.at(r1, r) * acceptable <= alphaR && good1 * toxU.at(s1, n - 1 - t) <= alphaT) return { r, t };
    }
    return null;
  };

  /**
   * Necessary for any final rule: some r with R(pR1) ≥ 1 − β and R(pR0) / R(pR1) ≤ αR / (1 − β), since
   * the toxicity factor is at most 1 and the same in both; R(pR1) falls as r rises.
   */
  const responseCanWork = (n: number, r1: number): boolean => {
    for (let r = r1; r < n; r++) {
      const good1 = resp1.at(r1, r);
      if (good1 < power) return false;
      if (resp0.at(r1, r) * power <= alphaR * good1) return true;
    }
    return false;
  };

  /** Likewise some t with T(acceptable) ≥ 1 − β and T(unacceptable) / T(acceptable) ≤ αT / (1 − β); T falls as t falls. */
  const toxicityCanWork = (n: number, n1: number, t1: number): boolean => {
    const s1 = n1 - 1 - t1;
    for (let t = n - 1; t >= t1; t--) {
      const acceptable = toxA.at(s1, n - 1 - t);
      if (acceptable < power) return false;
      if (toxU.at(s1, n - 1 - t) * power <= alphaT * acceptable) return true;
    }
    return false;
  };

  // Per (n1, n): whether each r1 and each t1 passes its necessary check (0 not yet asked, 1 yes, 2 no).
  const responseState = new Int8Array(nmax);
  const toxicityState = new Int8Array(nmax);

  /** The design of this (n1, n) with the least objective below `bound`, or null. */
  const bestStage = (n: number, n1: number, bound: number): Found | null => {
    const n2 = n - n1;
    // P(Y1 ≤ t1 | pT) = P(non-toxic > n1 − 1 − t1 | 1 − pT).
    const okA = (t1: number) => safeA.sf(n1, n1 - 1 - t1);
    const okU = (t1: number) => safeU.sf(n1, n1 - 1 - t1);
    let tables = false;
    const passes = (state: Int8Array, i: number, check: () => boolean): boolean => {
      if (!tables) {
        for (const table of [resp0, resp1, toxA, toxU]) table.reset(n1, n);
        responseState.fill(0, 0, n1);
        toxicityState.fill(0, 0, n1);
        tables = true;
      }
      if (state[i] === 0) state[i] = check() ? 1 : 2;
      return state[i] === 1;
    };
    let best: Found | null = null;
    // tMin: the least t1 with P(X1 > r1 | pR1) · P(Y1 ≤ t1 | acceptable) ≥ 1 − β; it only falls as r1 falls.
    let tMin = n1 - 1;
    for (let r1 = n1 - 1; r1 >= 0; r1--) {
      const go0 = poor.sf(n1, r1);
      const go1 = good.sf(n1, r1);
      if (go1 * okA(n1 - 1) < power) continue;
      while (tMin > 0 && go1 * okA(tMin - 1) >= power) tMin--;
      for (let t1 = tMin; t1 < n1; t1++) {
        const objective = n1 + n2 * Math.max(go0 * okA(t1), go1 * okU(t1));
        if (objective >= (best?.objective ?? bound)) break;
        if (!passes(responseState, r1, () => responseCanWork(n, r1))) break;
        if (!passes(toxicityState, t1, () => toxicityCanWork(n, n1, t1))) continue;
        const cutoffs = finalCutoffs(n, n1, r1, t1);
        if (cutoffs) {
          best = { n1, r1, t1, n, ...cutoffs, objective };
          break;
        }
      }
    }
    return best;
  };

  /** The best design of size n below `bound`, or null; a size that cannot separate either pair of rates holds none. */
  const bestOfSize = (n: number, bound: number): Found | null => {
    if (!canDiscriminate(good, poor, n, power, alphaR) || !canDiscriminate(safeA, safeU, n, power, alphaT)) return null;
    let best: Found | null = null;
    let least = bound;
    // The objective is at least n1.
    for (let n1 = 1; n1 < n && n1 < least; n1++) {
      best = bestStage(n, n1, least) ?? best;
      least = best?.objective ?? bound;
    }
    return best;
  };

  let optimal: Found | null = null;
  let minimax: Found | null = null;
  const totalWork = (nmax * (nmax + 1)) ** 2;
  for (let n = 2; n <= nmax; n++) {
    // Only a design better than the optimal so far is returned.
    const bestHere = bestOfSize(n, optimal?.objective ?? Infinity);
    if (bestHere) {
      minimax ??= bestHere;
      optimal = bestHere;
    }
    // The work up to n grows about as the sum of m³, which is (n(n + 1) / 2)².
    options.onProgress?.((n * (n + 1)) ** 2 / totalWork);
  }
  const describe = (found: Found | null) => (found ? describeDesign(found, settings) : null);
  return { optimal: describe(optimal), minimax: describe(minimax) };
}

/**
 * Whether n patients can separate the two rates at all: the Neyman–Pearson test on the total count,
 * randomised to power exactly 1 − β, must have size ≤ α. Any two-stage rule is a test on the same n
 * patients, so its size is at least that test's at its own power; and a promising probability of
 * R(alternative) · T ≥ 1 − β with R(null) · T ≤ α needs R(null) / R(alternative) ≤ α / (1 − β), which
 * that size bound (convex in the power, zero at zero) only allows when the test at 1 − β is within α.
 * A small relative slack keeps rounding from ever ruling out a size that could work.
 */
function canDiscriminate(alternative: BinomialRows, nullRate: BinomialRows, n: number, power: number, alpha: number): boolean {
  // Largest c with P(X ≥ c | alternative) ≥ power; reject above c, and at c with the chance that makes the power exact.
  let c = 0;
  while (c < n && alternative.sf(n, c) >= power) c++;
  const atC = alternative.pmf(n, c);
  const share = atC > 0 ? (power - alternative.sf(n, c)) / atC : 0;
  const size = nullRate.sf(n, c) + share * nullRate.pmf(n, c);
  return size <= alpha * (1 + 1e-9);
}

/** P(X1 > r1, X1 + X2 > r) with X1 ~ Bin(n1, p), X2 ~ Bin(n − n1, p), summed over x1. */
function bothStages(rows: BinomialRows, n1: number, n: number, r1: number, r: number): number {
  let total = 0;
  for (let x1 = r1 + 1; x1 <= n1; x1++) total += rows.pmf(n1, x1) * rows.sf(n - n1, r - x1);
  return total;
}

function describeDesign(found: Found, settings: BryantDaySettings): BryantDayDesign {
  const { n1, r1, t1, n, r, t } = found;
  const response = (p: number) => {
    const rows = new BinomialRows(n, p);
    return { promising: bothStages(rows, n1, n, r1, r), continues: rows.sf(n1, r1) };
  };
  const toxicity = (pT: number) => {
    const rows = new BinomialRows(n, 1 - pT);
    return { promising: bothStages(rows, n1, n, n1 - 1 - t1, n - 1 - t), continues: rows.sf(n1, n1 - 1 - t1) };
  };
  const poor = response(settings.pR0);
  const good = response(settings.pR1);
  const acceptable = toxicity(settings.toxAcceptable);
  const high = toxicity(settings.toxUnacceptable);
  return {
    n1,
    r1,
    t1,
    n,
    r,
    t,
    alphaR: poor.promising * acceptable.promising,
    alphaT: good.promising * high.promising,
    power: good.promising * acceptable.promising,
    expectedN: {
      poorResponse: n1 + (n - n1) * poor.continues * acceptable.continues,
      highToxicity: n1 + (n - n1) * good.continues * high.continues,
    },
  };
}

function validateRule(design: BryantDayRule): void {
  if (typeof design !== 'object' || design === null) {
    throw new StatsInputError('design', 'A design with n1, r1, t1, n, r and t is required.');
  }
  const n = requireCount('n', design.n, 2);
  if (n > BRYANT_DAY_NMAX_LIMIT) {
    throw new StatsInputError('n', `n (${n}) is above ${BRYANT_DAY_NMAX_LIMIT}, the largest Bryant–Day design offered.`);
  }
  const n1 = requireCount('n1', design.n1, 1);
  if (n1 >= n) throw new StatsInputError('n1', `n1 (${n1}) must be less than n (${n}).`);
  for (const [stage1, final] of [['r1', 'r'], ['t1', 't']] as const) {
    const c1 = requireCount(stage1, design[stage1]);
    const c = requireCount(final, design[final]);
    if (c1 >= n1) throw new StatsInputError(stage1, `${stage1} (${c1}) must be less than n1 (${n1}).`);
    if (c < c1) throw new StatsInputError(final, `${final} (${c}) must be at least ${stage1} (${c1}).`);
    if (c >= n) throw new StatsInputError(final, `${final} (${c}) must be less than n (${n}).`);
  }
}

/** A patient's four cell probabilities [response & toxicity, response only, toxicity only, neither]. */
function cellProbabilities(pR: number, pT: number, oddsRatio: number): [number, number, number, number] {
  // p11 solves (ψ − 1)x² − Sx + ψ·pR·pT = 0, S = 1 + (pR + pT)(ψ − 1); the root in its rationalised
  // form has no cancellation near ψ = 1 and is exactly pR·pT there.
  const s = 1 + (pR + pT) * (oddsRatio - 1);
  const root = Math.sqrt(Math.max(0, s * s - 4 * oddsRatio * (oddsRatio - 1) * pR * pT));
  const denominator = s + root;
  const raw = denominator > 0 ? (2 * oddsRatio * pR * pT) / denominator : Math.min(pR, pT);
  const both = Math.min(Math.min(pR, pT), Math.max(Math.max(0, pR + pT - 1), raw));
  return [both, pR - both, pT - both, Math.max(0, 1 - pR - pT + both)];
}

/** Joint pmf of (responses, toxicities) among m patients, at index x·(m + 1) + y. */
function jointCounts(m: number, cells: [number, number, number, number]): Float64Array {
  const [both, responseOnly, toxicityOnly, neither] = cells;
  const w = m + 1;
  let current = new Float64Array(w * w);
  let next = new Float64Array(w * w);
  current[0] = 1;
  for (let i = 1; i <= m; i++) {
    next.fill(0);
    for (let x = 0; x < i; x++) {
      for (let y = 0; y < i; y++) {
        const mass = current[x * w + y];
        if (mass === 0) continue;
        next[x * w + y] += mass * neither;
        next[(x + 1) * w + y] += mass * responseOnly;
        next[x * w + y + 1] += mass * toxicityOnly;
        next[(x + 1) * w + y + 1] += mass * both;
      }
    }
    [current, next] = [next, current];
  }
  return current;
}

/**
 * For the design at (pR, pT): P(promising), P(stop after stage 1) and the expected size. Exact over
 * the four response × toxicity cells per patient, so an association between the two (odds ratio ≠ 1)
 * is accounted for; at odds ratio 1 it equals the independent product R(pR) · T(pT).
 */
export function bryantDayCharacteristics(design: BryantDayRule, scenario: BryantDayScenario): BryantDayPoint {
  validateRule(design);
  if (typeof scenario !== 'object' || scenario === null) throw new StatsInputError('pR', 'pR and pT are required.');
  const { pR, pT } = scenario;
  for (const [field, value] of [['pR', pR], ['pT', pT]] as const) {
    if (typeof value !== 'number' || !(value >= 0 && value <= 1)) {
      throw new StatsInputError(field, `${field} must be a rate between 0 and 1 (got ${String(value)}).`);
    }
  }
  const oddsRatio = requirePositive('oddsRatio', scenario.oddsRatio ?? 1);
  const { n1, r1, t1, n, r, t } = design;
  const n2 = n - n1;
  const cells = cellProbabilities(pR, pT, oddsRatio);
  const first = jointCounts(n1, cells);
  const second = jointCounts(n2, cells);
  // late[(a + 1)·w + b] = P(X2 > a, Y2 ≤ b) for a in −1 … n2, b in 0 … n2.
  const w = n2 + 1;
  const late = new Float64Array((n2 + 2) * w);
  for (let a = n2 - 1; a >= -1; a--) {
    let column = 0;
    for (let b = 0; b <= n2; b++) {
      column += second[(a + 1) * w + b];
      late[(a + 1) * w + b] = late[(a + 2) * w + b] + column;
    }
  }
  const lateTail = (a: number, b: number) => (b < 0 ? 0 : late[(Math.min(Math.max(a, -1), n2) + 1) * w + Math.min(b, n2)]);
  let continues = 0;
  let promising = 0;
  for (let x1 = r1 + 1; x1 <= n1; x1++) {
    for (let y1 = 0; y1 <= t1; y1++) {
      const mass = first[x1 * (n1 + 1) + y1];
      continues += mass;
      promising += mass * lateTail(r - x1, t - y1);
    }
  }
  return { pR, pT, oddsRatio, probPromising: promising, probEarlyStop: 1 - continues, expectedN: n1 + n2 * continues };
}
