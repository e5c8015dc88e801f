/**
 * log Γ(x) for x > 0 by Stirling's series with Bernoulli-number corrections
 * (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 6.1.40),
 * shifted upward by the recurrence Γ(x+1) = xΓ(x) for x < 10.
 */
const HALF_LOG_TWO_PI = 0.9189385332046727;

/** Binet's remainder ω(x) = lnΓ(x) − [(x − ½)ln x − x + ½ln 2π], for x ≥ 10. */
export function stirlingRemainder(x: number): number {
  const r = 1 / x;
  const r2 = r * r;
  return (
    r *
    (1 / 12 +
      r2 *
        (-1 / 360 +
          r2 * (1 / 1260 + r2 * (-1 / 1680 + r2 * (1 / 1188 + r2 * (-691 / 360360 + r2 * (1 / 156 + r2 * (-3617 / 122400))))))))
  );
}

export function logGamma(x: number): number {
  if (!(x > 0)) return x === 0 ? Infinity : NaN;
  if (x === Infinity) return Infinity;
  if (x >= 10) return (x - 0.5) * Math.log(x) - x + HALF_LOG_TWO_PI + stirlingRemainder(x);
  let shift = 1;
  let y = x;
  while (y < 10) {
    shift *= y;
    y += 1;
  }
  return (y - 0.5) * Math.log(y) - y + HALF_LOG_TWO_PI + stirlingRemainder(y) - Math.log(shift);
}

/**
 * ln B(a, b) = lnΓ(a) + lnΓ(b) − lnΓ(a + b), arranged so that large
 * arguments do not cancel (the differences of Stirling forms are taken in
 * closed form with log1p).
 */
export function logBeta(a: number, b: number): number {
  const small = Math.min(a, b);
  const large = Math.max(a, b);
  if (large < 10) return logGamma(a) + logGamma(b) - logGamma(a + b);
  if (small >= 10) {
    const sum = a + b;
    return (
      HALF_LOG_TWO_PI +
      (small - 0.5) * -Math.log1p(large / small) +
      large * -Math.log1p(small / large) -
      0.5 * Math.log(large) +
      stirlingRemainder(small) +
      stirlingRemainder(large) -
      stirlingRemainder(sum)
    );
  }
  // lnΓ(small) + [lnΓ(large) − lnΓ(large + small)]
  const y = large;
  const s = small;
  const difference =
    -(y - 0.5) * Math.log1p(s / y) - s * Math.log(y + s) + s + stirlingRemainder(y) - stirlingRemainder(y + s);
  return logGamma(s) + difference;
}
