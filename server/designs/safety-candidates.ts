/**
 * The Designs page's safety computations, pure: the Bryant–Day search with the numbers a signature
 * needs, the joint design's characteristics (the probability of a promising result over a grid of
 * response × toxicity rates, and the effect of an association between a patient's response and
 * toxicity), and the continuous toxicity boundary with its operating characteristics. The search and
 * the grid run in the worker thread (candidates-pool.ts), so they take and return plain data only.
 */
import { InputError } from '../http/errors.js';
import {
  bryantDayCharacteristics,
  bryantDayDesigns,
  toxicityBoundary,
  toxicityBoundaryCharacteristics,
  type BryantDayDesign,
  type BryantDayDesigns,
  type BryantDayRule,
  type ToxicityBoundary,
  type ToxicityOperatingPoint,
} from '../stats/index.js';
import type { BryantDayCharacteristicsInput, SafetyDesignSettings, ToxicityBoundarySettings } from '../safety/index.js';

/** Both designs, or 400 naming nmax when no design of at most nmax patients meets the three constraints. */
export function safetyDesigns(settings: SafetyDesignSettings): { optimal: BryantDayDesign; minimax: BryantDayDesign } {
  const found: BryantDayDesigns = bryantDayDesigns(settings);
  if (!found.optimal || !found.minimax) {
    const message = `No Bryant–Day design with at most ${settings.nmax} patients keeps αR ≤ ${settings.alphaR} and αT ≤ ${settings.alphaT} with power ${+(1 - settings.beta).toFixed(4)}. Allow more patients, or revisit the rates or error levels.`;
    throw new InputError(message, { nmax: message });
  }
  return { optimal: found.optimal, minimax: found.minimax };
}

/** The signed numbers of the chosen Bryant–Day design: its rule, attained levels and sizes, and P(stop after stage 1) under poor response. */
export type BryantDayChoice = BryantDayDesign & { pet0: number };

export function bryantDayChoice(settings: SafetyDesignSettings, selection: 'optimal' | 'minimax'): BryantDayChoice {
  const design = safetyDesigns(settings)[selection];
  const { probEarlyStop } = bryantDayCharacteristics(design, { pR: settings.pR0, pT: settings.toxAcceptable });
  return { ...design, pet0: probEarlyStop };
}

export type BryantDayGrid = {
  /** True response rates across (columns). */
  responseRates: number[];
  /** True toxicity rates, one line each. */
  toxicityRates: number[];
  /** probPromising[i][j]: at toxicityRates[i] and responseRates[j], response and toxicity independent. */
  probPromising: number[][];
  /** The design at its three scenarios under odds ratios of association between response and toxicity. */
  association: Array<{ oddsRatio: number; poorResponse: number; highToxicity: number; power: number; expectedNPoorResponse: number }>;
};

const round3 = (x: number) => Math.round(x * 1000) / 1000;

/** Response rates 0 … 1 in steps of 0.05 with pR0 and pR1 exactly; toxicity rates from none to past the unacceptable one. */
function gridRates(input: Pick<BryantDayCharacteristicsInput, 'pR0' | 'pR1' | 'toxAcceptable' | 'toxUnacceptable'>) {
  const responseRates = [...new Set([...Array.from({ length: 21 }, (_, i) => i / 20), input.pR0, input.pR1])].sort((a, b) => a - b);
  const { toxAcceptable: a, toxUnacceptable: u } = input;
  const toxicityRates = [...new Set([0, a / 2, a, (a + u) / 2, u, Math.min(0.95, u + (u - a))].map(round3))].sort((x, y) => x - y);
  return { responseRates, toxicityRates };
}

export const ODDS_RATIOS = [0.25, 0.5, 1, 2, 4];

export function bryantDayGrid(input: BryantDayCharacteristicsInput): BryantDayGrid {
  const rule: BryantDayRule = { n1: input.n1, r1: input.r1, t1: input.t1, n: input.n, r: input.r, t: input.t };
  const { responseRates, toxicityRates } = gridRates(input);
  const probPromising = toxicityRates.map((pT) => responseRates.map((pR) => bryantDayCharacteristics(rule, { pR, pT }).probPromising));
  const association = ODDS_RATIOS.map((oddsRatio) => {
    const poor = bryantDayCharacteristics(rule, { pR: input.pR0, pT: input.toxAcceptable, oddsRatio });
    return {
      oddsRatio,
      poorResponse: poor.probPromising,
      highToxicity: bryantDayCharacteristics(rule, { pR: input.pR1, pT: input.toxUnacceptable, oddsRatio }).probPromising,
      power: bryantDayCharacteristics(rule, { pR: input.pR1, pT: input.toxAcceptable, oddsRatio }).probPromising,
      expectedNPoorResponse: poor.expectedN,
    };
  });
  return { responseRates, toxicityRates, probPromising, association };
}

/** True toxicity rates for the boundary's chart: 0 to a little past θ + 0.3, in steps of 0.01, with θ exactly. */
export function toxicityGrid(theta: number): number[] {
  const top = Math.min(100, Math.ceil((theta + 0.3) * 100));
  return [...new Set([...Array.from({ length: top + 1 }, (_, i) => i / 100), theta])].sort((a, b) => a - b);
}

export type BoundaryWithCurve = ToxicityBoundary & { curve: ToxicityOperatingPoint[] };

/** The boundary and its operating characteristics: probability of stopping, expected patients treated and toxicities. */
export function boundaryWithCurve(settings: ToxicityBoundarySettings): BoundaryWithCurve {
  const boundary = toxicityBoundary(settings);
  return { ...boundary, curve: toxicityBoundaryCharacteristics(boundary.bounds, toxicityGrid(settings.theta)) };
}
