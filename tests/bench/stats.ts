/**
 * Statistics engine benchmarks: simonDesigns against a plain four-nested-loop search, and
 * binomialTest at n = 10^7 against @stdlib/stats-binomial-test, both timed in the same run; the
 * Bryant–Day search and the toxicity boundary against their time budgets.
 * Run alone with `npx tsx tests/bench/stats.ts`; `npm run bench` collects the same figures.
 */
import { pathToFileURL } from 'node:url';
import stdlibBinomialTest from '@stdlib/stats-binomial-test';
import { binomialTest, bryantDayDesigns, simonDesigns, toxicityBoundary } from '../../server/stats/index.js';
import type { BenchFigure } from './figures.js';

const SETTINGS = { p0: 0.6, p1: 0.75, alpha: 0.05, beta: 0.1 };
/** Budget for one brute-force run; above it the comparison moves to a smaller nmax. */
const BRUTE_FORCE_BUDGET_MS = 20_000;

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function timeMedian(repetitions: number, work: () => unknown): number {
  const times: number[] = [];
  for (let i = 0; i < repetitions; i++) {
    const started = performance.now();
    work();
    times.push(performance.now() - started);
  }
  return median(times);
}

function binomialRows(nmax: number, p: number): { pmf: number[][]; upper: number[][] } {
  const pmf: number[][] = [];
  const upper: number[][] = [];
  for (let m = 0; m <= nmax; m++) {
    const row: number[] = [];
    let logC = 0;
    for (let k = 0; k <= m; k++) {
      if (k > 0) logC += Math.log((m - k + 1) / k);
      row.push(Math.exp(logC + k * Math.log(p) + (m - k) * Math.log1p(-p)));
    }
    const tail: number[] = new Array(nmax + 2).fill(0);
    for (let k = m - 1; k >= 0; k--) tail[k] = tail[k + 1] + row[k + 1];
    pmf.push(row);
    upper.push(tail);
  }
  return { pmf, upper };
}

/**
 * The straightforward search: every n, n1, r1 and r, each type I error and power summed afresh
 * over x1 (binomial tables built once). Returns the optimal and minimax (n, EN0).
 */
function bruteForceSearch(nmax: number): { optimalEn0: number; minimaxN: number } {
  const { p0, p1, alpha, beta } = SETTINGS;
  const t0 = binomialRows(nmax, p0);
  const t1 = binomialRows(nmax, p1);
  const reject = (t: { pmf: number[][]; upper: number[][] }, n1: number, r1: number, n: number, r: number) => {
    let s = 0;
    for (let x1 = r1 + 1; x1 <= n1; x1++) s += t.pmf[n1][x1] * (r - x1 < 0 ? 1 : t.upper[n - n1][r - x1]);
    return s;
  };
  let optimalEn0 = Infinity;
  let minimaxN = Infinity;
  for (let n = 2; n <= nmax; n++) {
    for (let n1 = 1; n1 < n; n1++) {
      for (let r1 = 0; r1 < n1; r1++) {
        for (let r = r1; r < n; r++) {
          if (reject(t0, n1, r1, n, r) > alpha || reject(t1, n1, r1, n, r) < 1 - beta) continue;
          const en0 = n1 + t0.upper[n1][r1] * (n - n1);
          optimalEn0 = Math.min(optimalEn0, en0);
          minimaxN = Math.min(minimaxN, n);
        }
      }
    }
  }
  return { optimalEn0, minimaxN };
}

/** The largest nmax whose brute-force run should fit the budget, from a timed small run and its ~nmax⁵ growth. */
function affordableNmax(): number {
  const probe = 80;
  const started = performance.now();
  bruteForceSearch(probe);
  const probeMs = Math.max(performance.now() - started, 1);
  const nmax = Math.floor(probe * Math.pow(BRUTE_FORCE_BUDGET_MS / probeMs, 1 / 5));
  return Math.min(150, Math.max(probe, nmax));
}

function simonFigures(): BenchFigure[] {
  const ours150 = timeMedian(9, () => simonDesigns({ ...SETTINGS, nmax: 150 }));
  const nmax = affordableNmax();
  const started = performance.now();
  const brute = bruteForceSearch(nmax);
  const bruteMs = performance.now() - started;
  const oursSame = nmax === 150 ? ours150 : timeMedian(9, () => simonDesigns({ ...SETTINGS, nmax }));
  const check = simonDesigns({ ...SETTINGS, nmax });
  const agree = Math.abs(check.optimal.en0 - brute.optimalEn0) < 1e-9 && check.minimax.n === brute.minimaxN;
  const figures: BenchFigure[] = [
    {
      name: `simonDesigns nmax ${nmax} (p0 0.60, p1 0.75, α 0.05, β 0.10)`,
      ours: { value: oursSame, unit: 'ms' },
      reference: { name: 'brute-force four-nested-loop search (one run)', value: bruteMs, unit: 'ms' },
      ratio: bruteMs / oursSame,
      note:
        (nmax < 150 ? `brute force at nmax 150 would exceed ~${BRUTE_FORCE_BUDGET_MS / 1000} s, so both are timed at nmax ${nmax}; ` : '') +
        `optimal EN0 and minimax n ${agree ? 'agree' : 'DISAGREE'} between the two searches`,
    },
  ];
  if (nmax < 150) {
    figures.push({
      name: 'simonDesigns nmax 150 (p0 0.60, p1 0.75, α 0.05, β 0.10)',
      ours: { value: ours150, unit: 'ms' },
      reference: { name: 'target: well under 1 s', value: 1000, unit: 'ms' },
      ratio: 1000 / ours150,
      note: 'median of 9 runs; the reference here is the time budget, not a program',
    });
  }
  return figures;
}

function binomialFigures(): BenchFigure[] {
  const n = 10_000_000;
  const p0 = 0.3;
  const cases = [
    { alternative: 'two-sided' as const, x: 3_001_234, oursReps: 201, refReps: 5 },
    { alternative: 'greater' as const, x: 3_002_000, oursReps: 201, refReps: 51 },
  ];
  return cases.map(({ alternative, x, oursReps, refReps }) => {
    const ours = timeMedian(oursReps, () => binomialTest(x, n, p0, { alternative }));
    const reference = timeMedian(refReps, () => stdlibBinomialTest(x, n, { p: p0, alternative }));
    const a = binomialTest(x, n, p0, { alternative });
    const b = stdlibBinomialTest(x, n, { p: p0, alternative });
    const relDiff = Math.abs(a.pValue - b.pValue) / b.pValue;
    return {
      name: `binomialTest n = 10^7, ${alternative} (x ${x}, p0 0.3, p-value and 95% CI)`,
      ours: { value: ours, unit: 'ms' },
      reference: { name: '@stdlib/stats-binomial-test', value: reference, unit: 'ms' },
      ratio: reference / ours,
      note: `median of ${oursReps} (ours) and ${refReps} (reference) runs; p-values differ by ${relDiff.toExponential(1)} relative`,
    };
  });
}

/** The worked example of Bryant & Day (1995); and a setting found slow at nmax 150 (its first design has n 126). */
const BRYANT_DAY_EXAMPLE = { pR0: 0.3, pR1: 0.5, toxAcceptable: 0.2, toxUnacceptable: 0.4, alphaR: 0.15, alphaT: 0.15, beta: 0.15 };
const BRYANT_DAY_SLOW = { pR0: 0.62, pR1: 0.73, toxAcceptable: 0.12, toxUnacceptable: 0.23, alphaR: 0.15, alphaT: 0.05, beta: 0.1 };

function safetyFigures(): BenchFigure[] {
  const budget = (value: number, what: string) => ({ name: `budget: ${what}`, value, unit: 'ms' });
  const figures: BenchFigure[] = [60, 100].map((nmax) => {
    const ours = timeMedian(5, () => bryantDayDesigns({ ...BRYANT_DAY_EXAMPLE, nmax }));
    return {
      name: `bryantDayDesigns nmax ${nmax} (p_R 0.3 / 0.5, toxicity 0.2 / 0.4, errors 0.15)`,
      ours: { value: ours, unit: 'ms' },
      reference: budget(1000, 'well under a few seconds on one core'),
      ratio: 1000 / ours,
      note: 'median of 5 runs; the reference here is the time budget, not a program',
    };
  });
  const slow = timeMedian(3, () => bryantDayDesigns({ ...BRYANT_DAY_SLOW, nmax: 150 }));
  figures.push({
    name: 'bryantDayDesigns nmax 150, the limit (p_R 0.62 / 0.73, toxicity 0.12 / 0.23, αR 0.15, αT 0.05, β 0.10)',
    ours: { value: slow, unit: 'ms' },
    reference: budget(5000, 'a few seconds at the largest nmax accepted'),
    ratio: 5000 / slow,
    note: 'median of 3 runs; a setting whose first design needs n 126, so most sizes are searched without a bound',
  });
  const boundary = timeMedian(21, () => toxicityBoundary({ n: 100, theta: 0.2, alpha: 0.1 }));
  figures.push({
    name: 'toxicityBoundary n 100 (θ 0.20, α 0.10)',
    ours: { value: boundary, unit: 'ms' },
    reference: budget(100, 'instant in a form'),
    ratio: 100 / boundary,
    note: 'median of 21 runs; the reference here is the time budget, not a program',
  });
  return figures;
}

export function runStatsBench(): Promise<BenchFigure[]> {
  return Promise.resolve([...simonFigures(), ...binomialFigures(), ...safetyFigures()]);
}

function printTable(figures: BenchFigure[]): void {
  for (const f of figures) {
    console.log(f.name);
    console.log(`  ours      ${f.ours.value.toFixed(3)} ${f.ours.unit}`);
    console.log(`  reference ${f.reference.value.toFixed(3)} ${f.reference.unit}  (${f.reference.name})`);
    console.log(`  ratio     ${f.ratio.toFixed(1)}× (reference / ours)`);
    if (f.note) console.log(`  note      ${f.note}`);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  printTable(await runStatsBench());
}
