/** The few jstat functions the statistics engine calls; jstat ships no type declarations. */
declare module 'jstat' {
  interface JStat {
    /** Inverse of the regularised incomplete beta I_x(a, b) (Newton from an asymptotic start). */
    ibetainv(p: number, a: number, b: number): number;
    /** Regularised incomplete beta I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    normal: {
      /** Quantile of the normal distribution with mean and standard deviation. */
      inv(p: number, mean: number, sd: number): number;
    };
  }
  const jStat: JStat;
  export default jStat;
}
