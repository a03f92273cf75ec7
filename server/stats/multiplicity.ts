/**
 * Adjusted p-values for several tests at once: Holm (1979) step-down, controlling the family-wise
 * error rate, and Benjamini & Hochberg (1995) step-up, controlling the false discovery rate.
 * Results are monotone in the sorted order, capped at 1, and returned in the input order.
 */
import { StatsInputError } from './errors.js';

export type AdjustMethod = 'holm' | 'bh';

export function adjustPValues(ps: number[], method: AdjustMethod): number[] {
  if (!Array.isArray(ps)) throw new StatsInputError('ps', 'ps must be a list of p-values.');
  ps.forEach((p, i) => {
    if (typeof p !== 'number' || !(p >= 0 && p <= 1)) {
      throw new StatsInputError('ps', `ps[${i}] must be a p-value between 0 and 1 (got ${String(p)}).`);
    }
  });
  if (method !== 'holm' && method !== 'bh') {
    throw new StatsInputError('method', `method must be holm or bh (got ${String(method)}).`);
  }
  const m = ps.length;
  const order = ps.map((_, i) => i).sort((i, j) => ps[i] - ps[j]);
  const adjusted = new Array<number>(m);
  if (method === 'holm') {
    let running = 0;
    order.forEach((index, rank) => {
      running = Math.max(running, Math.min(1, (m - rank) * ps[index]));
      adjusted[index] = running;
    });
  } else {
    let running = 1;
    for (let rank = m - 1; rank >= 0; rank--) {
      const index = order[rank];
      running = Math.min(running, (m / (rank + 1)) * ps[index]);
      adjusted[index] = running;
    }
  }
  return adjusted;
}
