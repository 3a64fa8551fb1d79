// jStat ships no types; these are the functions the specs use as references.
declare module 'jstat' {
  const jStat: {
    poisson: { cdf(k: number, lambda: number): number };
    normal: { cdf(x: number, mean: number, sd: number): number };
    lowRegGamma(a: number, x: number): number;
  };
  export default jStat;
}
