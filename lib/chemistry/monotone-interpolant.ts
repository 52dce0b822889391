/**
 * Piecewise cubic Hermite interpolation that keeps monotone data monotone (Fritsch & Carlson, "Monotone
 * piecewise cubic interpolation", SIAM J. Numer. Anal. 17(2), 1980). Tangents are fixed once here, so
 * each evaluation is a short search and one cubic.
 */
export function monotoneInterpolant(xs: readonly number[], ys: readonly number[]): (x: number) => number {
  const n = xs.length;
  if (n < 2 || ys.length !== n) throw new Error("monotoneInterpolant needs two or more points, as many x as y");
  const x = Float64Array.from(xs);
  const y = Float64Array.from(ys);
  const secant = new Float64Array(n - 1);
  for (let k = 0; k < n - 1; k++) {
    const h = x[k + 1] - x[k];
    if (!(h > 0)) throw new Error("monotoneInterpolant needs strictly increasing x");
    secant[k] = (y[k + 1] - y[k]) / h;
  }
  const tangent = new Float64Array(n);
  tangent[0] = secant[0];
  tangent[n - 1] = secant[n - 2];
  for (let k = 1; k < n - 1; k++) {
    tangent[k] = secant[k - 1] * secant[k] <= 0 ? 0 : (secant[k - 1] + secant[k]) / 2;
  }
  for (let k = 0; k < n - 1; k++) {
    if (secant[k] === 0) {
      tangent[k] = 0;
      tangent[k + 1] = 0;
      continue;
    }
    const a = tangent[k] / secant[k];
    const b = tangent[k + 1] / secant[k];
    const r = a * a + b * b;
    // Outside the circle of radius 3 the cubic can overshoot; scaling back onto it restores monotonicity.
    if (r > 9) {
      const t = 3 / Math.sqrt(r);
      tangent[k] = t * a * secant[k];
      tangent[k + 1] = t * b * secant[k];
    }
  }
  return (v: number): number => {
    let k = 0;
    let hi = n - 2;
    while (k < hi) {
      const mid = (k + hi + 1) >> 1;
      if (x[mid] <= v) k = mid;
      else hi = mid - 1;
    }
    const h = x[k + 1] - x[k];
    const t = (v - x[k]) / h;
    const t2 = t * t;
    const t3 = t2 * t;
    return (
      (2 * t3 - 3 * t2 + 1) * y[k] +
      (t3 - 2 * t2 + t) * h * tangent[k] +
      (-2 * t3 + 3 * t2) * y[k + 1] +
      (t3 - t2) * h * tangent[k + 1]
    );
  };
}
