/**
 * Binomial probabilities for every size 0 … nmax at one rate, built once for searches that read
 * thousands of them: the pmf from its saddle-point logarithm and the upper tail P(X > k) summed from
 * the top, so a small tail keeps its precision. Lower tails are read as upper tails at the
 * complementary rate (build a second table) for the same reason.
 */
import { binomialLogPmf } from './special.js';

export class BinomialRows {
  readonly nmax: number;
  private readonly width: number;
  private readonly pmfs: Float64Array;
  private readonly tails: Float64Array;

  constructor(nmax: number, p: number) {
    const width = nmax + 1;
    this.nmax = nmax;
    this.width = width;
    this.pmfs = new Float64Array(width * width);
    this.tails = new Float64Array(width * width);
    for (let m = 0; m <= nmax; m++) {
      const row = m * width;
      let above = 0;
      for (let k = m; k >= 0; k--) {
        this.tails[row + k] = above;
        const mass = Math.exp(binomialLogPmf(k, m, p));
        this.pmfs[row + k] = mass;
        above += mass;
      }
    }
  }

  /** P(X = k) for X ~ Binomial(m, p); 0 outside 0 … m. */
  pmf(m: number, k: number): number {
    return k < 0 || k > m ? 0 : this.pmfs[m * this.width + k];
  }

  /** P(X > k) for X ~ Binomial(m, p); 1 below 0, 0 from m on. */
  sf(m: number, k: number): number {
    if (k < 0) return 1;
    return k >= m ? 0 : this.tails[m * this.width + k];
  }
}
