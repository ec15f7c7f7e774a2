// Minimal typing of ml-regression's multivariate linear regression (the library ships no types of its own).
declare module 'ml-regression' {
  export class MultivariateLinearRegression {
    constructor(x: number[][], y: number[][], options?: { intercept?: boolean; statistics?: boolean });
    /** One row per input column (then the intercept row when fitted with one), one column per output. */
    weights: number[][];
    predict(x: number[]): number[];
  }
}
