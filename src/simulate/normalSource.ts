/**
 * Standard normal deviates from a uniform generator by the polar method of
 * Marsaglia & Bray (1964), "A convenient method for generating normal
 * variables", SIAM Review 6(3):260–264. Each accepted pair of uniforms yields
 * two independent normals; the second is kept for the next call, so the
 * sequence depends only on the uniform stream.
 */
export function normalSource(random: () => number): () => number {
  let spare = 0;
  let hasSpare = false;
  return () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      u = 2 * random() - 1;
      v = 2 * random() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const scale = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v * scale;
    hasSpare = true;
    return u * scale;
  };
}
