/**
 * Seeded generators and plain-array helpers shared by the Riccati, LQR and Kalman tests.
 * Entries are small integers scaled by 1/4, so generated data is exactly representable and
 * never subnormal or huge (fast-check's raw doubles would test the generator, not the code).
 */
import fc from "fast-check";

export type Rows = number[][];

export const matrixOf = (rows: number, cols: number, lo = -8, hi = 8): fc.Arbitrary<Rows> =>
  fc.array(fc.array(fc.integer({ min: lo, max: hi }).map((v) => v / 4), { minLength: cols, maxLength: cols }), {
    minLength: rows, maxLength: rows,
  });

export function mul(a: Rows, b: Rows): Rows {
  return a.map((row) => b[0]!.map((_, j) => row.reduce((s, v, k) => s + v * b[k]![j]!, 0)));
}
export const tr = (a: Rows): Rows => a[0]!.map((_, j) => a.map((row) => row[j]!));
export const add = (a: Rows, b: Rows, sb = 1): Rows => a.map((row, i) => row.map((v, j) => v + sb * b[i]![j]!));
export const eye = (n: number, s = 1): Rows => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? s : 0)));
export const diag = (d: number[]): Rows => d.map((v, i) => d.map((_, j) => (i === j ? v : 0)));
export const scale = (a: Rows, s: number): Rows => a.map((row) => row.map((v) => v * s));

/**
 * A random (A, B, Q, R, N) with [Q N; Nᵀ R] = MMᵀ + diag(δI, I) positive definite, so (Q̃, A) is
 * observable and R positive definite; (A, B) is stabilizable for almost every draw (the
 * property tests skip the measure-zero rest through the solver's own typed error).
 */
export const riccatiProblem = (withCross: boolean) =>
  fc.record({ n: fc.integer({ min: 1, max: 7 }), m: fc.integer({ min: 1, max: 3 }) }).chain(({ n, m }) =>
    fc.record({
      A: matrixOf(n, n),
      B: matrixOf(n, m),
      M: matrixOf(n + m, n + m, -4, 4),
    }).map(({ A, B, M }) => {
      const W = add(mul(M, tr(M)), diag([...Array(n).fill(0.5), ...Array(m).fill(1)]));
      const Q = W.slice(0, n).map((row) => row.slice(0, n));
      const R = W.slice(n).map((row) => row.slice(n));
      const N = withCross ? W.slice(0, n).map((row) => row.slice(n)) : null;
      return { n, m, A, B, Q, R, N };
    }),
  );

/** Relative Frobenius residual of the continuous equation at X, computed in plain arrays. */
export function continuousResidual(A: Rows, B: Rows, Q: Rows, R: Rows, N: Rows | null, X: Rows): number {
  const XBN = N ? add(mul(X, B), N) : mul(X, B);
  const Rinv = invert(R);
  const res = add(add(add(mul(tr(A), X), mul(X, A)), Q), mul(mul(XBN, Rinv), tr(XBN)), -1);
  return fro(res) / fro(X);
}

/** Relative Frobenius residual of the discrete equation at X. */
export function discreteResidual(A: Rows, B: Rows, Q: Rows, R: Rows, N: Rows | null, X: Rows): number {
  const AXB = mul(mul(tr(A), X), B);
  const T = N ? add(AXB, N) : AXB;
  const S = add(R, mul(mul(tr(B), X), B));
  const res = add(add(add(mul(mul(tr(A), X), A), X, -1), Q), mul(mul(T, invert(S)), tr(T)), -1);
  return fro(res) / fro(X);
}

export const fro = (a: Rows): number => Math.sqrt(a.flat().reduce((s, v) => s + v * v, 0));

/** Gauss–Jordan inverse with partial pivoting (small test matrices only). */
export function invert(a: Rows): Rows {
  const n = a.length;
  const m = a.map((row, i) => [...row, ...eye(n)[i]!]);
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(m[i]![k]!) > Math.abs(m[p]![k]!)) p = i;
    [m[k], m[p]] = [m[p]!, m[k]!];
    const rowK = m[k]!;
    const piv = rowK[k]!;
    for (let j = 0; j < 2 * n; j++) rowK[j] = rowK[j]! / piv;
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      const rowI = m[i]!;
      const f = rowI[k]!;
      for (let j = 0; j < 2 * n; j++) rowI[j] = rowI[j]! - f * rowK[j]!;
    }
  }
  return m.map((row) => row.slice(n));
}
