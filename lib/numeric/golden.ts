/**
 * Golden-section search for the maximum of a unimodal function on [a, b] (Kiefer 1953):
 * the bracket shrinks by 0.618 per evaluation until narrower than `tol` or `maxIter` steps.
 * Returns the middle of the final bracket.
 */
export function goldenMax(f: (x: number) => number, a: number, b: number, tol: number, maxIter = 200): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let it = 0; it < maxIter && b - a > tol; it++) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = f(d);
    }
  }
  return (a + b) / 2;
}
