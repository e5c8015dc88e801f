// The few jStat functions plexus uses (the package ships no types).
declare module "jstat" {
  interface BetaDistribution {
    inv(p: number, alpha: number, beta: number): number;
    cdf(x: number, alpha: number, beta: number): number;
  }
  interface JStatStatic {
    beta: BetaDistribution;
    ibeta(x: number, a: number, b: number): number;
    gammaln(x: number): number;
  }
  const jStat: JStatStatic;
  export default jStat;
}
