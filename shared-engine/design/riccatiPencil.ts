/**
 * The extended (2n+m)-order Riccati pencil, compressed to order 2n and solved by QZ with the
 * stable deflating subspace reordered to the front. Used for every discrete equation (it needs
 * neither A⁻¹ nor R⁻¹) and for continuous equations with an ill-conditioned R.
 */
import { EngineError } from "../errors";
import { qzRowMajor, reorderQzRowMajor, type GeneralizedEigenvalue } from "../linalg";
import { graphSolution, symplecticScaling, type RiccatiData } from "./riccati";
import { frobeniusOf, powerOfTwoNear } from "./riccatiKernels";

/**
 * Relative distance from the stability boundary (imaginary axis, unit circle) below which an
 * eigenvalue of the Hamiltonian / pencil is taken to lie on it. WARNING: a boundary eigenvalue
 * from an uncontrollable-and-unobservable mode forms a 2×2 Jordan block, which rounding splits
 * by O(√ε); 10·√ε ≈ 1.5e-7 (relative to ‖H‖_F, or absolute on the unit circle) is just above that.
 */
export const STABILITY_BOUNDARY_TOLERANCE = 10 * Math.sqrt(Number.EPSILON);

/**
 * Builds, compresses and solves the extended pencil (Arnold & Laub 1984, §II; Van Dooren 1981):
 *   continuous: λ·diag(I, I, 0) − [A 0 B; −Q −Aᵀ −N; Nᵀ Bᵀ R]
 *   discrete:   λ·[I 0 0; 0 Aᵀ 0; 0 −Bᵀ 0] − [A 0 B; −Q I −N; Nᵀ 0 R]
 * The last m columns are removed by a QR factorisation of [B; −N; R] (m Householder
 * reflections applied from the left), leaving a regular 2n×2n pencil with the same finite
 * eigenvalues as the Hamiltonian / symplectic problem. Q, N, R are first scaled by a power of
 * two s so that ‖[Q N; Nᵀ R]‖ matches ‖[A B]‖ (X of the scaled problem is s·X), then the pencil
 * is balanced by D = diag(S, S⁻¹, T) (`symplecticScaling`) before compression.
 * Only the right deflating subspace (Z) is read, so QZ and the reordering skip accumulating Q
 * (about a fifth of their work); `accumulateQ = true` runs the full path instead, for tests
 * that check both give the same X bit for bit.
 */
export function solveByExtendedPencil(
  data: RiccatiData, kind: "continuous" | "discrete", accumulateQ = false,
): { x: Float64Array; rcond: number } {
  const { n, m, a, b, q, r, nCross } = data;
  const normAB = Math.max(frobeniusOf(a), frobeniusOf(b));
  const normW = Math.max(frobeniusOf(q), frobeniusOf(nCross), frobeniusOf(r));
  const s = normAB > 0 && normW > 0 ? powerOfTwoNear(normAB / normW) : 1;
  const size = 2 * n + m;
  const w = 2 * n;
  // Left 2n columns of the pencil (size × 2n, row-major), and the m columns to compress.
  const hl = new Float64Array(size * w);
  const jl = new Float64Array(size * w);
  const mc = new Float64Array(size * m);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      hl[i * w + j] = a[i * n + j]!;
      hl[(n + i) * w + j] = -s * q[i * n + j]!;
      if (kind === "continuous") {
        hl[(n + i) * w + n + j] = -a[j * n + i]!;
      } else {
        jl[(n + i) * w + n + j] = a[j * n + i]!;
      }
    }
    jl[i * w + i] = 1;
    if (kind === "continuous") jl[(n + i) * w + n + i] = 1;
    else hl[(n + i) * w + n + i] = 1;
    for (let j = 0; j < m; j++) {
      mc[i * m + j] = b[i * m + j]!;
      mc[(n + i) * m + j] = -s * nCross[i * m + j]!;
      hl[(w + j) * w + i] = s * nCross[i * m + j]!; // row block 3: Nᵀ
      if (kind === "continuous") hl[(w + j) * w + n + i] = b[i * m + j]!; // Bᵀ
      else jl[(w + j) * w + n + i] = -b[i * m + j]!; // −Bᵀ
    }
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) mc[(w + i) * m + j] = s * r[i * m + j]!;

  // Symplectic-structured balancing of the whole pencil, D = diag(S, S⁻¹, T): H ← D⁻¹HD, J ← D⁻¹JD.
  const mag = new Float64Array(size * size);
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < w; j++) mag[i * size + j] = Math.abs(hl[i * w + j]!) + Math.abs(jl[i * w + j]!);
    for (let j = 0; j < m; j++) mag[i * size + w + j] = Math.abs(mc[i * m + j]!);
  }
  const d = symplecticScaling(mag, size, n);
  for (let i = 0; i < size; i++) {
    const di = d[i]!;
    for (let j = 0; j < w; j++) { const f = d[j]! / di; hl[i * w + j] *= f; jl[i * w + j] *= f; }
    for (let j = 0; j < m; j++) mc[i * m + j] *= d[w + j]! / di;
  }

  compressColumns(mc, hl, jl, size, m, w);
  const hc = hl.subarray(m * w);
  const jc = jl.subarray(m * w);

  const form = qzRowMajor(hc, jc, w, { wantQ: accumulateQ });
  const normH = frobeniusOf(hc);
  for (const ev of form.eigenvalues) checkBoundary(ev, kind, normH);
  const select = kind === "continuous"
    ? (ev: GeneralizedEigenvalue) => !ev.infinite && ev.value !== null && ev.value.re < 0
    : (ev: GeneralizedEigenvalue) => !ev.infinite && ev.value !== null && Math.hypot(ev.value.re, ev.value.im) < 1;
  const selectedCount = reorderQzRowMajor(form, select);
  if (selectedCount !== n) {
    throw new EngineError("no-stabilizing-solution", `No stabilizing solution: the ${kind} Riccati pencil has ${selectedCount} stable eigenvalues, not ${n}`, {
      reason: "wrong-stable-count", stableCount: selectedCount, expected: n,
    });
  }
  const { x, rcond } = graphSolution(form.ZT, n, true);
  // Undo the scalings: X = S⁻¹·X_b·S⁻¹ / s.
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) x[i * n + j] /= s * d[i]! * d[j]!;
  return { x, rcond };
}

function checkBoundary(ev: GeneralizedEigenvalue, kind: "continuous" | "discrete", normH: number): void {
  const alphaAbs = Math.hypot(ev.alpha.re, ev.alpha.im);
  const scale = Math.max(alphaAbs, Math.abs(ev.beta));
  if (scale <= Number.EPSILON * normH * 100) {
    throw new EngineError("no-stabilizing-solution", `No stabilizing solution: the ${kind} Riccati pencil is singular (α and β both vanish)`, {
      reason: "singular-pencil", alpha: ev.alpha, beta: ev.beta,
    });
  }
  if (ev.infinite || ev.value === null) return;
  const onBoundary = kind === "continuous"
    ? Math.abs(ev.value.re) <= STABILITY_BOUNDARY_TOLERANCE * Math.max(normH, 1)
    : Math.abs(Math.hypot(ev.value.re, ev.value.im) - 1) <= STABILITY_BOUNDARY_TOLERANCE;
  if (onBoundary) {
    throw new EngineError(
      "no-stabilizing-solution",
      kind === "continuous"
        ? "No stabilizing solution: the Riccati pencil has an eigenvalue on the imaginary axis (a mode is not stabilizable or not detectable)"
        : "No stabilizing solution: the Riccati pencil has an eigenvalue on the unit circle (a mode is not stabilizable or not detectable)",
      { reason: kind === "continuous" ? "eigenvalue-on-imaginary-axis" : "eigenvalue-on-unit-circle", eigenvalue: ev.value, tolerance: STABILITY_BOUNDARY_TOLERANCE },
    );
  }
}

/**
 * Householder QR of the size×m array `mc` (Golub & Van Loan 4th ed., Alg. 5.2.1); each
 * reflector is applied to the size×w arrays `hl` and `jl` as well, so that afterwards rows
 * m..size−1 of hl, jl form the compressed pencil Q₂ᵀ[H J] with Q₂ᵀ[B; −N; R] = 0.
 */
function compressColumns(mc: Float64Array, hl: Float64Array, jl: Float64Array, size: number, m: number, w: number): void {
  const v = new Float64Array(size);
  for (let k = 0; k < m; k++) {
    let maxAbs = 0;
    for (let i = k; i < size; i++) maxAbs = Math.max(maxAbs, Math.abs(mc[i * m + k]!));
    if (maxAbs === 0) continue;
    let sumSq = 0;
    for (let i = k; i < size; i++) { const t = mc[i * m + k]! / maxAbs; sumSq += t * t; }
    const norm = maxAbs * Math.sqrt(sumSq);
    const alpha = mc[k * m + k]!;
    const beta = alpha >= 0 ? -norm : norm;
    // v = x − βe₁, reflector I − 2vvᵀ/(vᵀv).
    for (let i = k; i < size; i++) v[i] = mc[i * m + k]!;
    v[k] = alpha - beta;
    let vv = 0;
    for (let i = k; i < size; i++) vv += v[i]! * v[i]!;
    if (vv === 0) continue;
    const f = 2 / vv;
    applyReflector(mc, m, k, size, v, f, k);
    applyReflector(hl, w, k, size, v, f, 0);
    applyReflector(jl, w, k, size, v, f, 0);
  }
}

function applyReflector(a: Float64Array, cols: number, k: number, size: number, v: Float64Array, f: number, firstCol: number): void {
  const acc = new Float64Array(cols);
  for (let i = k; i < size; i++) {
    const vi = v[i]!;
    if (vi === 0) continue;
    const io = i * cols;
    for (let j = firstCol; j < cols; j++) acc[j] += vi * a[io + j]!;
  }
  for (let i = k; i < size; i++) {
    const vi = f * v[i]!;
    if (vi === 0) continue;
    const io = i * cols;
    for (let j = firstCol; j < cols; j++) a[io + j] -= vi * acc[j]!;
  }
}
