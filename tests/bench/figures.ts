/**
 * One benchmark figure: our timing beside the same work done by a reference in the same run.
 * `ratio` is reference.value / ours.value, so a ratio above 1 means ours is faster.
 */
export type BenchFigure = {
  name: string;
  ours: { value: number; unit: string };
  reference: { name: string; value: number; unit: string };
  ratio: number;
  note?: string;
};

/** One goal of the performance issue, judged from the figures of the same run. */
export type BenchGoal = { goal: string; measured: string; met: boolean };
