// Minimal typing of the parts of jstat (a general-purpose statistics library, dev dependency) the tests use
// as an outside reference.
declare module 'jstat' {
  interface JStatStatic {
    gammaln(x: number): number;
    median(xs: number[]): number;
    lowRegGamma(a: number, x: number): number;
    ibeta(x: number, a: number, b: number): number;
    poisson: { pdf(k: number, l: number): number; cdf(k: number, l: number): number };
    negbin: { pdf(k: number, r: number, p: number): number; cdf(k: number, r: number, p: number): number };
    normal: { cdf(x: number, mean: number, sd: number): number; inv(p: number, mean: number, sd: number): number };
    studentt: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
    binomial: { cdf(k: number, n: number, p: number): number; pdf(k: number, n: number, p: number): number };
    chisquare: { cdf(x: number, dof: number): number };
    gamma: { cdf(x: number, shape: number, scale: number): number; inv(p: number, shape: number, scale: number): number };
  }
  const jStat: JStatStatic;
  export default jStat;
}
