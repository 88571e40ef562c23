/**
 * The jstat package ships no type declarations; these cover the functions Quasilevel uses.
 * Extend here (one place) when another part of jstat is needed.
 */
declare module 'jstat' {
  interface ContinuousDistribution1 {
    pdf(x: number, dof: number): number;
    cdf(x: number, dof: number): number;
    inv(p: number, dof: number): number;
  }
  interface NormalDistribution {
    pdf(x: number, mean: number, sd: number): number;
    cdf(x: number, mean: number, sd: number): number;
    inv(p: number, mean: number, sd: number): number;
  }
  interface JStatStatic {
    /** Regularised incomplete beta I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    /** Inverse of I_x(a, b) in x. */
    ibetainv(p: number, a: number, b: number): number;
    gammaln(x: number): number;
    studentt: ContinuousDistribution1;
    normal: NormalDistribution;
  }
  export const jStat: JStatStatic;
}
