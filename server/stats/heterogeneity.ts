/**
 * Do response rates differ between sites? A k×2 table of responders and non-responders per site.
 *
 * - Pearson chi-square with k − 1 degrees of freedom.
 * - Exact test conditional on both margins: Fisher's exact test for 2×2, its Freeman–Halton extension
 *   for k×2. The p-value sums the probabilities of all tables no more likely than the observed one
 *   (relative tolerance 1e-7). Tables are enumerated site by site, largest site first; since the
 *   largest and smallest weight the remaining sites can add is known for every partial table, whole
 *   subtrees are added in closed form (by Vandermonde's identity) or skipped.
 *
 * Sites without patients carry no information and are left out (so k counts the others). When the
 * enumeration would visit more than EXACT_NODE_LIMIT partial tables (for instance ten sites of forty
 * patients each), `pValueExact` is null and the chi-square p-value stands alone.
 */
import { StatsInputError } from './errors.js';
import { chiSquareUpper, lchoose } from './special.js';

export interface HeterogeneityResult {
  chiSquare: number;
  df: number;
  pValueChiSquare: number;
  pValueExact: number | null;
}

/** About half a second of enumeration; beyond it the exact p-value is not offered. */
const EXACT_NODE_LIMIT = 1_000_000;
const RELATIVE_TOLERANCE = 1 + 1e-7;

function validateTable(table: Array<[number, number]>): Array<[number, number]> {
  if (!Array.isArray(table)) throw new StatsInputError('table', 'table must list [responders, nonResponders] per site.');
  table.forEach((row, i) => {
    const ok =
      Array.isArray(row) && row.length === 2 && row.every((v) => typeof v === 'number' && Number.isInteger(v) && v >= 0);
    if (!ok) {
      throw new StatsInputError('table', `Row ${i + 1} must be [responders, nonResponders], two whole numbers, 0 or more.`);
    }
  });
  const rows = table.filter(([a, b]) => a + b > 0);
  if (rows.length < 2) throw new StatsInputError('table', 'At least two sites with patients are needed to compare them.');
  return rows;
}

/** Freeman–Halton p-value, or null when the table is too large to enumerate within the limit. */
function exactPValue(totals: number[], responders: number, observed: number[]): number | null {
  const k = totals.length;
  const total = totals.reduce((s, t) => s + t, 0);
  const weight = (i: number, a: number) => lchoose(totals[i], a);
  // remaining[i] = patients in sites i..k−1.
  const remaining = new Array<number>(k + 1).fill(0);
  for (let i = k - 1; i >= 0; i--) remaining[i] = remaining[i + 1] + totals[i];
  // Extreme log-weights of completing a partial table from site i with c responders already placed.
  const maxRest: Float64Array[] = [];
  const minRest: Float64Array[] = [];
  for (let i = 0; i <= k; i++) {
    maxRest.push(new Float64Array(responders + 1).fill(-Infinity));
    minRest.push(new Float64Array(responders + 1).fill(Infinity));
  }
  maxRest[k][responders] = 0;
  minRest[k][responders] = 0;
  for (let i = k - 1; i >= 0; i--) {
    for (let c = 0; c <= responders; c++) {
      const need = responders - c;
      for (let a = Math.max(0, need - remaining[i + 1]); a <= Math.min(totals[i], need); a++) {
        const w = weight(i, a);
        maxRest[i][c] = Math.max(maxRest[i][c], w + maxRest[i + 1][c + a]);
        minRest[i][c] = Math.min(minRest[i][c], w + minRest[i + 1][c + a]);
      }
    }
  }
  const logAll = lchoose(total, responders);
  const limit = observed.reduce((sum, a, i) => sum + weight(i, a), 0) + Math.log(RELATIVE_TOLERANCE);
  let visits = 0;
  let sum = 0;
  const visit = (i: number, c: number, past: number): boolean => {
    if (++visits > EXACT_NODE_LIMIT) return false;
    const need = responders - c;
    if (past + maxRest[i][c] <= limit) {
      // Every completion qualifies: their weights sum to C(remaining patients, responders still to place).
      sum += Math.exp(past + lchoose(remaining[i], need) - logAll);
      return true;
    }
    if (past + minRest[i][c] > limit) return true;
    for (let a = Math.max(0, need - remaining[i + 1]); a <= Math.min(totals[i], need); a++) {
      if (!visit(i + 1, c + a, past + weight(i, a))) return false;
    }
    return true;
  };
  return visit(0, 0, 0) ? Math.min(1, sum) : null;
}

export function heterogeneity(table: Array<[responders: number, nonResponders: number]>): HeterogeneityResult {
  const rows = validateTable(table);
  const df = rows.length - 1;
  const totals = rows.map(([a, b]) => a + b);
  const total = totals.reduce((s, t) => s + t, 0);
  const responders = rows.reduce((s, [a]) => s + a, 0);
  // With no responders, or no non-responders, every site looks the same.
  if (responders === 0 || responders === total) return { chiSquare: 0, df, pValueChiSquare: 1, pValueExact: 1 };
  // Large sites first: the sites left to place are then small, so the bounds decide subtrees sooner.
  const order = totals.map((_, i) => i).sort((i, j) => totals[j] - totals[i]);
  let chiSquare = 0;
  rows.forEach(([a, b], i) => {
    const expectedA = (totals[i] * responders) / total;
    const expectedB = totals[i] - expectedA;
    chiSquare += (a - expectedA) ** 2 / expectedA + (b - expectedB) ** 2 / expectedB;
  });
  return {
    chiSquare,
    df,
    pValueChiSquare: chiSquareUpper(chiSquare, df),
    pValueExact: exactPValue(order.map((i) => totals[i]), responders, order.map((i) => rows[i][0])),
  };
}
