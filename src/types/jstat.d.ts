// The jStat functions plexus and its tests use (the package ships no types).
declare module "jstat" {
  interface ContinuousDistribution {
    cdf(x: number, ...parameters: number[]): number;
    inv(p: number, ...parameters: number[]): number;
    pdf(x: number, ...parameters: number[]): number;
  }
  interface DiscreteDistribution {
    cdf(k: number, n: number, p: number): number;
    pdf(k: number, n: number, p: number): number;
  }
  interface JStatStatic {
    beta: ContinuousDistribution;
    chisquare: ContinuousDistribution;
    normal: ContinuousDistribution;
    studentt: ContinuousDistribution;
    centralF: ContinuousDistribution;
    binomial: DiscreteDistribution;
    hypgeom: { pdf(...parameters: number[]): number; cdf(...parameters: number[]): number };
    ibeta(x: number, a: number, b: number): number;
    gammaln(x: number): number;
  }
  const jStat: JStatStatic;
  export default jStat;
}
