/**
 * Standard normal density and distribution function, accurate to about 1e-14
 * absolute, which the integrals for the range constants need (a 1e-7
 * approximation of erfc would show in the sixth decimal of d3).
 */
const SQRT_2PI = Math.sqrt(2 * Math.PI);
const SQRT_PI = Math.sqrt(Math.PI);

export function normalPdf(x: number): number {
  return Math.exp(-0.5 * x * x) / SQRT_2PI;
}

/** erfc for z >= 0. */
function erfcPositive(z: number): number {
  if (z < 3) {
    // erf(z) = 2/sqrt(pi) e^{-z^2} sum 2^n z^{2n+1} / (1*3*...*(2n+1)): every term positive,
    // so nothing cancels.
    let term = z;
    let sum = z;
    for (let n = 1; n < 200; n++) {
      term *= (2 * z * z) / (2 * n + 1);
      sum += term;
      if (term < sum * 1e-17) break;
    }
    return 1 - ((2 / SQRT_PI) * Math.exp(-z * z) * sum);
  }
  // Continued fraction erfc(z) = e^{-z^2}/sqrt(pi) * 1/(z + (1/2)/(z + 1/(z + (3/2)/(z + ...)))),
  // evaluated from the tail; 80 levels are far more than z >= 3 needs.
  let f = z;
  for (let k = 80; k >= 1; k--) f = z + k / 2 / f;
  return Math.exp(-z * z) / SQRT_PI / f;
}

export function normalCdf(x: number): number {
  const z = x / Math.SQRT2;
  return z >= 0 ? 1 - 0.5 * erfcPositive(z) : 0.5 * erfcPositive(-z);
}
