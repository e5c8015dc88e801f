import { regularizedIncompleteBeta } from "./incompleteBeta.js";
import { logBeta, logGamma } from "./logGamma.js";
import { upperIncompleteGamma } from "./upperIncompleteGamma.js";

/**
 * The noncentral t distribution: its CDF and the inversion that gives a
 * confidence interval for the noncentrality parameter.
 *
 * CDF: the Poisson mixture of incomplete beta functions of Lenth (1989,
 * Algorithm AS 243, Applied Statistics 38:185–189), summed outward from the
 * Poisson mode in both directions with the incomplete beta recurrences, as in
 * Benton & Krishnamoorthy (2003, Computational Statistics & Data Analysis
 * 43:249–267), so each evaluation needs two incomplete beta functions and
 * O(√λ) cheap terms whatever the noncentrality.
 */

const SQRT_HALF = Math.SQRT1_2;
/** A term below this (times the bound on what follows it) ends a direction of the sum. */
const TERM_EPSILON = 1e-17;
const MAX_TERMS = 100_000;

/** Φ(−z) = P(Z > z) for the standard normal, through Q(½, z²/2) (Abramowitz & Stegun 1964, 26.2.30 with 6.5.17). */
export function normalUpperTail(z: number): number {
  if (Number.isNaN(z)) return NaN;
  const half = 0.5 * upperIncompleteGamma(0.5, 0.5 * z * z);
  return z >= 0 ? half : 1 - half;
}

/**
 * S = Σ_j [P_j I_x(j + ½, b) + Q_j I_x(j + 1, b)] with P_j = e^{−λ} λ^j / j!,
 * Q_j = e^{−λ} λ^j / Γ(j + 3/2) · δ/√2, λ = δ²/2 (AS 243's series), for
 * 0 < x < 1 given with its complement; and, in `slope[0]`, dS/dδ from the same
 * terms: dP_j/dδ = P_j (2j/δ − δ), dQ_j/dδ = Q_j ((2j + 1)/δ − δ).
 */
function mixtureSum(x: number, complement: number, b: number, delta: number, slope: Float64Array): number {
  const lambda = 0.5 * delta * delta;
  if (lambda === 0) {
    // At δ = 0 only Q_0 = δ/(√2 Γ(3/2)) moves: dS/dδ = √(2/π) I_x(1, b).
    slope[0] = Math.sqrt(2 / Math.PI) * regularizedIncompleteBeta(x, 1, b, complement);
    return regularizedIncompleteBeta(x, 0.5, b, complement);
  }
  const k = Math.floor(lambda);
  const logLambda = Math.log(lambda);
  const logX = Math.log(x);
  const logComplement = Math.log(complement);
  const pMode = Math.exp(-lambda + k * logLambda - logGamma(k + 1));
  const qMode = Math.exp(-lambda + k * logLambda - logGamma(k + 1.5)) * delta * SQRT_HALF;
  // g(a) = x^a (1 − x)^b / (a B(a, b)), so that I_x(a + 1, b) = I_x(a, b) − g(a).
  const front = (a: number): number => Math.exp(a * logX + b * logComplement - logBeta(a, b)) / a;
  const iPMode = regularizedIncompleteBeta(x, k + 0.5, b, complement);
  const iQMode = regularizedIncompleteBeta(x, k + 1, b, complement);
  const gPMode = front(k + 0.5);
  const gQMode = front(k + 1);

  let sum = 0;
  let weightedP = 0; // Σ j P_j I^P_j
  let weightedQ = 0; // Σ (2j + 1) Q_j I^Q_j
  // Upward from the mode: P_j and I decrease, so what follows a term is at most term · r/(1 − r), r = λ/(j + 1).
  let p = pMode;
  let q = qMode;
  let iP = iPMode;
  let iQ = iQMode;
  let gP = gPMode;
  let gQ = gQMode;
  for (let j = k; j < k + MAX_TERMS; j++) {
    const termP = p * iP;
    const termQ = q * iQ;
    sum += termP + termQ;
    weightedP += j * termP;
    weightedQ += (2 * j + 1) * termQ;
    const aP = j + 0.5;
    const aQ = j + 1;
    iP = Math.max(0, iP - gP);
    iQ = Math.max(0, iQ - gQ);
    gP *= (x * (aP + b)) / (aP + 1);
    gQ *= (x * (aQ + b)) / (aQ + 1);
    p *= lambda / (j + 1);
    q *= lambda / (j + 1.5);
    const ratio = lambda / (j + 2);
    if ((p + Math.abs(q)) * iP < TERM_EPSILON * (1 - ratio) || p + Math.abs(q) === 0) break;
  }
  // Downward from the mode: P_j decreases and I ≤ 1, so what is left is at most (P_j + |Q_j|) · j/(λ − j) at j < λ.
  p = pMode;
  q = qMode;
  iP = iPMode;
  iQ = iQMode;
  gP = gPMode;
  gQ = gQMode;
  for (let j = k - 1; j >= 0; j--) {
    const aP = j + 0.5; // the new a; g(a) = g(a + 1)·(a + 1)/(x(a + b))
    const aQ = j + 1;
    gP *= (aP + 1) / (x * (aP + b));
    gQ *= (aQ + 1) / (x * (aQ + b));
    iP = Math.min(1, iP + gP);
    iQ = Math.min(1, iQ + gQ);
    p *= (j + 1) / lambda;
    q *= (j + 1.5) / lambda;
    const termP = p * iP;
    const termQ = q * iQ;
    sum += termP + termQ;
    weightedP += j * termP;
    weightedQ += (2 * j + 1) * termQ;
    const left = j < lambda ? j / (lambda - j) : Infinity;
    if ((p + Math.abs(q)) * left < TERM_EPSILON || p + Math.abs(q) === 0) break;
  }
  slope[0] = (2 * weightedP + weightedQ) / delta - delta * sum;
  return sum;
}

/** P(T ≤ t) for T noncentral t with `df` degrees of freedom and noncentrality `delta` (AS 243; see the file's comment). */
export function noncentralTCdf(t: number, df: number, delta: number): number {
  return noncentralTCdfAndSlope(t, df, delta, new Float64Array(1));
}

/** P(T ≤ t; df, δ) as noncentralTCdf, with ∂P/∂δ in `slope[0]` (summed from the same terms). */
export function noncentralTCdfAndSlope(t: number, df: number, delta: number, slope: Float64Array): number {
  slope[0] = NaN;
  if (Number.isNaN(t) || Number.isNaN(delta) || !(df > 0) || !Number.isFinite(delta)) return NaN;
  if (t === Infinity || t === -Infinity) {
    slope[0] = 0;
    return t > 0 ? 1 : 0;
  }
  // T(δ) has the law of −T(−δ): P(T ≤ t; δ) = 1 − G(−t; −δ), whose δ-derivative is ∂G/∂δ at (−t, −δ).
  if (t < 0) return 1 - nonnegativeCdf(-t, df, -delta, slope);
  return nonnegativeCdf(t, df, delta, slope);
}

/** G(t; δ) = P(T ≤ t) for t ≥ 0, with ∂G/∂δ in `slope[0]`. */
function nonnegativeCdf(t: number, df: number, delta: number, slope: Float64Array): number {
  const start = normalUpperTail(delta);
  const density = Math.exp(-0.5 * delta * delta) / Math.sqrt(2 * Math.PI);
  if (t === 0) {
    slope[0] = -density;
    return start;
  }
  const t2 = t * t;
  const x = t2 / (t2 + df);
  const complement = df / (t2 + df);
  const value = start + 0.5 * mixtureSum(x, complement, 0.5 * df, delta, slope);
  // ∂G/∂δ = −φ(δ) + ½ dS/dδ.
  slope[0] = 0.5 * slope[0] - density;
  return Math.min(1, Math.max(0, value));
}

/** The standard normal quantile z with Φ(z) = p, by bisection on the tail (used once per interval level, not per edge). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) return p === 0 ? -Infinity : p === 1 ? Infinity : NaN;
  if (p === 0.5) return 0;
  const tail = p > 0.5 ? 1 - p : p;
  let lo = 0;
  let hi = 40;
  for (let i = 0; i < 200 && hi - lo > 1e-16 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (normalUpperTail(mid) > tail) lo = mid;
    else hi = mid;
  }
  const z = 0.5 * (lo + hi);
  return p > 0.5 ? z : -z;
}

/** Relative step that ends the bracketed root search for a noncentrality. */
const ROOT_TOLERANCE = 1e-12;
/**
 * A Newton step at most this large (relative) ends the search: Newton's error
 * after it is about |F''/(2F')|·step², below 1e-13 for these smooth CDFs.
 */
const NEWTON_TOLERANCE = 1e-7;
const slopeScratch = new Float64Array(1);

/**
 * The δ with P(T ≤ t; df, δ) = p (the CDF falls as δ grows): Newton steps
 * with the CDF's δ-derivative (summed with it, noncentralTCdfAndSlope) from
 * `guess`, or else from the normal approximation T ≈ δ + z_p·√(1 + δ²/(2 df));
 * when Newton does not settle, a bracketed secant search (Illinois variant).
 * `zP` is Φ⁻¹(p), passed in so that many edges share one quantile.
 */
export function noncentralityForProbability(t: number, df: number, p: number, zP: number, guess?: number): number {
  if (!Number.isFinite(t) || !(df > 0) || !(p > 0 && p < 1)) return NaN;
  const spread = (delta: number): number => Math.sqrt(1 + (delta * delta) / (2 * df));
  let start = t - zP * spread(t);
  start = t - zP * spread(start);
  let delta = guess !== undefined && Number.isFinite(guess) ? guess : start;
  for (let iteration = 0; iteration < 20; iteration++) {
    const value = noncentralTCdfAndSlope(t, df, delta, slopeScratch) - p;
    const slope = slopeScratch[0];
    if (value === 0) return delta;
    if (!(slope < 0) || !Number.isFinite(value)) break;
    let step = -value / slope;
    const cap = spread(delta);
    if (Math.abs(step) > cap) step = Math.sign(step) * cap;
    delta += step;
    if (Math.abs(step) <= NEWTON_TOLERANCE * Math.max(1, Math.abs(delta))) return delta;
  }
  return bracketedNoncentrality(t, df, p, start);
}

function bracketedNoncentrality(t: number, df: number, p: number, start: number): number {
  const f = (delta: number): number => noncentralTCdf(t, df, delta) - p;
  const spread = (delta: number): number => Math.sqrt(1 + (delta * delta) / (2 * df));
  let d0 = start;
  let f0 = f(d0);
  if (f0 === 0) return d0;
  // A second point one approximate standard deviation away on the side of the root.
  const width = spread(d0);
  let d1 = f0 > 0 ? d0 + 0.25 * width : d0 - 0.25 * width;
  let f1 = f(d1);
  // Widen until the root is bracketed (f > 0 left of the root, f < 0 right of it).
  let step = 0.5 * width;
  let guard = 0;
  while (f1 !== 0 && Math.sign(f1) === Math.sign(f0) && guard++ < 200) {
    d0 = d1;
    f0 = f1;
    d1 = f0 > 0 ? d1 + step : d1 - step;
    step *= 2;
    f1 = f(d1);
  }
  if (f1 === 0) return d1;
  if (Math.sign(f1) === Math.sign(f0)) return NaN;
  // Illinois: a secant step inside the bracket [a, b], halving the stale end's value when the same end stays twice.
  let a = d0;
  let fa = f0;
  let b = d1;
  let fb = f1;
  for (let iteration = 0; iteration < 100; iteration++) {
    const c = b - (fb * (b - a)) / (fb - fa);
    const fc = f(c);
    if (fc === 0) return c;
    const moved = Math.abs(c - b);
    if (Math.sign(fc) !== Math.sign(fb)) {
      a = b;
      fa = fb;
    } else {
      fa *= 0.5;
    }
    b = c;
    fb = fc;
    if (moved <= ROOT_TOLERANCE * Math.max(1, Math.abs(c))) return c;
  }
  return b;
}

/**
 * The confidence interval [δ_L, δ_U] of the noncentrality of an observed t
 * with `df` degrees of freedom at `level` (e.g. 0.95): P(T ≤ t; δ_L) = (1 + level)/2
 * and P(T ≤ t; δ_U) = (1 − level)/2, the inversion of Steiger & Fouladi (1997,
 * in What If There Were No Significance Tests?, 221–257) and Cumming & Finch
 * (2001, Educational and Psychological Measurement 61:532–574).
 */
export function noncentralityInterval(t: number, df: number, level: number): [number, number] {
  const upper = (1 + level) / 2;
  const lower = (1 - level) / 2;
  return [
    noncentralityForProbability(t, df, upper, normalQuantile(upper)),
    noncentralityForProbability(t, df, lower, normalQuantile(lower)),
  ];
}
