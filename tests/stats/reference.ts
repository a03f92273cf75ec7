/**
 * Plain, independent reference computations for the statistics tests: binomial and hypergeometric
 * probabilities from summed log-factorials, with no code shared with server/stats.
 */
const logFactorials: number[] = [0];

export function logFactorial(n: number): number {
  for (let i = logFactorials.length; i <= n; i++) logFactorials[i] = logFactorials[i - 1] + Math.log(i);
  return logFactorials[n];
}

export function logChoose(n: number, k: number): number {
  return logFactorial(n) - logFactorial(k) - logFactorial(n - k);
}

export function binomPmf(k: number, n: number, p: number): number {
  if (k < 0 || k > n) return 0;
  return Math.exp(logChoose(n, k) + k * Math.log(p) + (n - k) * Math.log1p(-p));
}

/** P(X > k), summed term by term. */
export function binomUpper(k: number, n: number, p: number): number {
  let s = 0;
  for (let j = Math.max(0, k + 1); j <= n; j++) s += binomPmf(j, n, p);
  return s;
}

/** P(X ≤ k), summed term by term. */
export function binomLower(k: number, n: number, p: number): number {
  let s = 0;
  for (let j = 0; j <= Math.min(k, n); j++) s += binomPmf(j, n, p);
  return s;
}

/** P(promising) of a two-stage design: X1 > r1 and X1 + X2 > r. */
export function promising(r1: number, n1: number, r: number, n: number, p: number): number {
  let s = 0;
  for (let x1 = r1 + 1; x1 <= n1; x1++) s += binomPmf(x1, n1, p) * binomUpper(r - x1, n - n1, p);
  return s;
}

/** Relative closeness with an absolute floor, for comparing probabilities. */
export function near(actual: number, expected: number, rel: number, abs = 0): boolean {
  return Math.abs(actual - expected) <= Math.max(rel * Math.abs(expected), abs);
}
