/**
 * Koyama & Chen (2008, Statistics in Medicine 27:3145–3154) §4: the p-value of a two-stage design whose
 * actual stage-2 size m2 differs from the planned n2 = n − n1, keeping the planned design. Orrery shows it
 * as a sensitivity figure beside the primary stage-wise p-value over the attained design
 * (`twoStageInference` with `n2Actual`).
 *
 * After x1 stage-1 responders the planned design's conditional type I error is
 * A(x1) = P(Bin(n2, p0) ≥ r + 1 − x1). The actual stage 2 gives the conditional p-value
 * q = P(Bin(m2, p0) ≥ x2). π* is the rate at which the planned stage 2 would reject with probability q:
 * P(Bin(n2, π*) ≥ r + 1 − x1) = q. The p-value is the planned design's chance of a promising result with
 * stage 1 at p0 and stage 2 at π*:  Σ_{y > r1} P(X1 = y | p0) · P(Bin(n2, π*) ≥ r + 1 − y).
 * So p ≤ the planned design's attained α exactly when q ≤ A(x1) (the conditional-error test), and the
 * figure stays valid when m2 was chosen after stage 1, as long as it does not depend on stage-2 outcomes.
 *
 * With m2 = n2 it equals the stage-wise p-value only on the planned boundary (x1 + x2 = r + 1, x1 ≤ r);
 * both then put p ≤ attained α exactly when x1 + x2 > r, but elsewhere they differ, because this family of
 * tests is not ordered by the total. This follows the authors' published R function `pval.st2`, including
 * π* = 0 once x1 > r: the planned design has then already succeeded (A = 1), so the figure is
 * P(X1 > r | p0) whatever stage 2 shows. Where the planned stage 2 could not reach r + 1 (A(x1) = 0),
 * π* = 1, the limit of the construction, is used.
 */
import { StatsInputError, requireAtMost, requireCount } from './errors.js';
import { binomialSf } from './binomial.js';
import { validateDesign, type InferenceDesign } from './inference.js';
import { betaQuantile, binomialLogPmf } from './special.js';

export interface KoyamaChenObservation {
  /** Stage-1 responders among the planned n1; above r1, since the trial went on to stage 2. */
  x1: number;
  /** Stage-2 responders among the m2 patients actually treated in stage 2. */
  x2: number;
  /** Actual stage-2 size. */
  m2: number;
}

/** The rate π at which P(Bin(n2, π) ≥ needed) equals the conditional p-value P(Bin(m2, p0) ≥ x2). */
function rateMatchingConditionalPValue(needed: number, n2: number, x2: number, m2: number, p0: number): number {
  if (needed <= 0) return 0;
  if (needed > n2) return 1;
  // P(Bin(n2, π) ≥ k) is the lower tail of Beta(k, n2 − k + 1) at π.
  return betaQuantile(binomialSf(x2 - 1, m2, p0), needed, n2 - needed + 1);
}

export function koyamaChenPValue(design: InferenceDesign, observed: KoyamaChenObservation): number {
  validateDesign(design);
  const { r1, n1, r, n, p0 } = design;
  if (n1 === n) throw new StatsInputError('n', `n (${n}) must exceed n1 (${n1}): the planned design needs a stage 2.`);
  if (typeof observed !== 'object' || observed === null) {
    throw new StatsInputError('x1', 'The observed x1, x2 and the actual stage-2 size m2 are required.');
  }
  const x1 = requireCount('x1', observed.x1);
  requireAtMost('x1', x1, 'n1', n1);
  if (x1 <= r1) {
    throw new StatsInputError('x1', `x1 (${x1}) must exceed r1 (${r1}): a trial that stopped after stage 1 has no stage 2.`);
  }
  const m2 = requireCount('m2', observed.m2, 1);
  const x2 = requireCount('x2', observed.x2);
  requireAtMost('x2', x2, 'm2', m2);

  const n2 = n - n1;
  const piStar = rateMatchingConditionalPValue(r + 1 - x1, n2, x2, m2, p0);
  let total = 0;
  for (let y = r1 + 1; y <= n1; y++) total += Math.exp(binomialLogPmf(y, n1, p0)) * binomialSf(r - y, n2, piStar);
  return Math.min(1, total);
}
