/**
 * Reordering of a generalized real Schur form: moves the eigenvalues chosen by a predicate to
 * the leading diagonal positions by swapping adjacent 1×1/2×2 blocks with orthogonal
 * transformations, so that the leading columns of Z (and Q) span the corresponding deflating
 * subspaces (used by Riccati solvers and stable/unstable splittings).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { GeneralizedEigenvalue, GeneralizedSchurForm, GeneralizedSchurWork } from "./qz";
import {
  ULP, type PencilWork, eigenvaluesOfForm, frobeniusNorm, matrixFromRowMajor, standardizeBlock2, transposeSquare,
} from "./qzKernels";
import { swapAdjacentBlocks as swapAdjacentBlocksShared, swapScratch } from "./qzSwap";
import { requireSquareFinite, toFloat64 } from "./validate";

// Read through an import binding, every call cost a getter call under per-file CommonJS
// transpilation (tsx, vitest).
const swapAdjacentBlocks = swapAdjacentBlocksShared;

/**
 * Computes: an updated generalized real Schur form (S', T', Q', Z') of the same pencil,
 *   A = Q'·S'·Z'ᵀ, E = Q'·T'·Z'ᵀ, with every eigenvalue for which `select` returns true in the
 *   leading `selectedCount` diagonal positions (their relative order kept). A complex pair is
 *   selected when `select` accepts either member.
 *
 * Requires: `form` as returned by `qz` (standardised blocks; it is not modified). `select` must
 * not put two eigenvalues that are equal (to rounding) on different sides: swapping blocks
 * with (nearly) equal spectra is ill-conditioned and is refused.
 *
 * Method: adjacent block swaps by the direct method of Kågström, "A direct method for
 * reordering eigenvalues in the generalized real Schur form of a regular matrix pair (A, B)",
 * in Linear Algebra for Large Scale and Real-Time Applications, Kluwer 1993, and Kågström &
 * Poromaa, "Computing eigenspaces with specified eigenvalues of a regular matrix pair (A, B)
 * and condition estimation: theory, algorithms and software", Numer. Algorithms 12, 1996:
 * solve the 2×2-block generalized Sylvester equation A11·R − L·A22 = −A12,
 * B11·R − L·B22 = −B12 (Kronecker form, Gaussian elimination with complete pivoting), take Q
 * and Z from QR factorizations of [L; I] and [R; I], and accept the swap only if it passes
 * their weak and strong stability tests. Two adjacent 1×1 blocks are swapped directly by a
 * pair of rotations (the same tests apply). 2×2 blocks are not re-standardised after each
 * swap (the swaps do not need it; block sizes are tracked explicitly): every moved 2×2 block
 * is standardised once, when all swaps are done.
 *
 * Cost: at most n²/2 swaps, each O(n) flops on S, T, Q, Z: O(n³) worst case, 4n² doubles.
 *
 * Accuracy: each swap perturbs the pencil by at most 100·ε·‖(window of S, T)‖_F (the stability
 * tests); the tests check ‖A − Q'S'Z'ᵀ‖_F ≤ 100·n·ε·‖A‖_F and orthogonality as for `qz`, and that
 * the eigenvalue multiset is unchanged to rounding. A 1×1 block reported infinite keeps
 * beta = 0 exactly through the swaps (a noise-level beta ≤ 10·n·ε·‖E‖_F left by a swap is reset
 * to zero), so infinite eigenvalues cannot turn into huge finite ones of arbitrary sign.
 *
 * Errors: "shape-mismatch"/"non-finite"/"empty" for a malformed form; "invalid-argument" when
 * `select` is not a function, or when it gives a different answer for an eigenvalue after the
 * swaps (the eigenvalue lies within rounding of the selection boundary; details: `position`);
 * "singular" when a swap fails the stability test (eigenvalues of the two blocks too close;
 * details: `position`, `residual`, `tolerance`).
 *
 * Example:
 *   const form = qz(A, E);
 *   const r = reorderQz(form, (ev) => ev.value !== null && ev.value.re < 0);
 *   // r.Z columns 0..r.selectedCount−1 span the stable deflating subspace;
 *   // ‖A − r.Q·r.S·r.Zᵀ‖_F / ‖A‖_F ≈ 1e−15
 */
export function reorderQz(
  form: GeneralizedSchurForm,
  select: (ev: GeneralizedEigenvalue) => boolean,
): GeneralizedSchurForm & { selectedCount: number } {
  checkSelect(select);
  const n = checkForm(form);
  const w: PencilWork = {
    n,
    S: toFloat64(form.S),
    T: toFloat64(form.T),
    QT: transposeSquare(toFloat64(form.Q), n),
    ZT: transposeSquare(toFloat64(form.Z), n),
  };
  const { eigenvalues, selectedCount } = reorderInPlace(w, select);
  return {
    S: matrixFromRowMajor(w.S, n, false),
    T: matrixFromRowMajor(w.T, n, false),
    Q: matrixFromRowMajor(w.QT!, n, true),
    Z: matrixFromRowMajor(w.ZT!, n, true),
    eigenvalues,
    iterations: form.iterations,
    selectedCount,
  };
}

/**
 * Computes: `reorderQz` on a row-major form from `qzRowMajor`, IN PLACE: work.S, work.T,
 * work.ZT (and work.QT when it is not null) are overwritten by the reordered form
 * (A = Q'·S'·Z'ᵀ, E = Q'·T'·Z'ᵀ with the selected eigenvalues leading) and work.eigenvalues by
 * its eigenvalues. With work.QT null the left transformations are not accumulated; S, T and Z
 * are bit-identical to those of the path with Q. Returns the number of leading selected
 * positions. For engine code that needs only the right deflating subspace (the Riccati pencil
 * solvers); public callers use `reorderQz`.
 *
 * Requires: `work` as returned by `qzRowMajor` (not validated again); `select` as `reorderQz`.
 *
 * Method: as `reorderQz` (Kågström 1993; Kågström & Poromaa 1996), skipping the updates of Qᵀ
 * when it is absent.
 *
 * Cost: as `reorderQz`, O(n³) worst case, less a quarter of the swap updates without Q; no
 * extra memory beyond O(1) scratch.
 *
 * Accuracy: as `reorderQz` (each swap passes the weak and strong stability tests).
 *
 * Errors: as `reorderQz`: "invalid-argument" (select not a function, or ill-posed selection),
 * "singular" (a swap fails the stability test).
 *
 * Example:
 *   const w = qzRowMajor(a, e, n, { wantQ: false });
 *   const k = reorderQzRowMajor(w, (ev) => ev.value !== null && ev.value.re < 0);
 *   // rows 0..k−1 of w.ZT span the stable right deflating subspace; ‖w.ZT·w.ZTᵀ − I‖_F ≈ 1e−15
 */
export function reorderQzRowMajor(work: GeneralizedSchurWork, select: (ev: GeneralizedEigenvalue) => boolean): number {
  checkSelect(select);
  const { eigenvalues, selectedCount } = reorderInPlace(work, select);
  work.eigenvalues = eigenvalues;
  return selectedCount;
}

function checkSelect(select: unknown): void {
  if (typeof select !== "function") {
    throw new EngineError("invalid-argument", "select must be a function from an eigenvalue to a boolean", { argument: "select" });
  }
}

/** The reordering proper on row-major storage (shared by both entry points). */
function reorderInPlace(
  w: PencilWork, select: (ev: GeneralizedEigenvalue) => boolean,
): { eigenvalues: GeneralizedEigenvalue[]; selectedCount: number } {
  const n = w.n;
  const bnorm = frobeniusNorm(w.T);
  const before = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  const blockSize = (i: number): 1 | 2 => (i + 1 < n && w.S[(i + 1) * n + i] !== 0 ? 2 : 1);
  const flags = new Uint8Array(n);
  for (let i = 0; i < n; i += blockSize(i)) {
    const chosen = blockSize(i) === 2 ? select(before[i]!) || select(before[i + 1]!) : select(before[i]!);
    flags[i] = chosen ? 1 : 0;
    if (blockSize(i) === 2) flags[i + 1] = flags[i]!;
  }

  // Block sizes are tracked explicitly (sizes[i] = 1 or 2 at a block start, 0 inside a 2×2
  // block): during the swaps 2×2 blocks are left unstandardised (T's block full), so S's
  // subdiagonal no longer tells them apart reliably.
  const sizes = new Uint8Array(n);
  for (let i = 0; i < n; i += blockSize(i)) sizes[i] = blockSize(i);
  const moved = new Uint8Array(n); // at block starts: the block took part in a swap
  const scratch = swapScratch;
  let ks = 0; // positions [0, ks) hold selected blocks in their final place
  let i = 0;
  while (i < n) {
    const size = sizes[i]!;
    if (!flags[i]) {
      i += size;
      continue;
    }
    let pos = i;
    const sz = size;
    while (pos > ks) {
      const above = pos - 2 >= ks && sizes[pos - 2] === 2 ? 2 : 1;
      const start = pos - above;
      swapAdjacentBlocks(w, start, above, sz, n * ULP * bnorm, scratch);
      for (let k = start; k < start + sz; k++) flags[k] = 1;
      for (let k = start + sz; k < start + sz + above; k++) flags[k] = 0;
      sizes.fill(0, start, start + sz + above);
      sizes[start] = sz;
      sizes[start + sz] = above;
      moved.fill(0, start, start + sz + above);
      moved[start] = 1;
      moved[start + sz] = 1;
      pos = start;
    }
    ks += sz;
    i = ks;
  }
  // Standardise every moved 2×2 block once, now that none moves any more (Kågström & Poromaa
  // re-standardise after every swap; the swaps themselves do not need it, and a block moved k
  // times would pay k standardisations over whole rows and columns). Blocks that never moved are
  // still standard. A block whose eigenvalues turned out real (a complex pair within rounding of
  // the real axis) splits into two 1×1 blocks.
  for (let j = 0; j < n; j += sizes[j]!) {
    if (sizes[j] === 2 && moved[j]) standardizeBlock2(w, j, 0, n);
  }

  const eigenvalues = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  // The check that the selected eigenvalues lead: the predicate agrees with the placement.
  for (let j = 0; j < n; j += blockSize(j)) {
    const chosen = blockSize(j) === 2 ? select(eigenvalues[j]!) || select(eigenvalues[j + 1]!) : select(eigenvalues[j]!);
    if (chosen !== j < ks) {
      throw new EngineError(
        "invalid-argument",
        `select changed its answer for the eigenvalue at position ${j + 1} during reordering: it lies within rounding error of the selection boundary, so the selection is ill-posed`,
        { argument: "select", position: j, selectedCount: ks },
      );
    }
  }
  return { eigenvalues, selectedCount: ks };
}

function checkForm(form: GeneralizedSchurForm): number {
  if (form === null || typeof form !== "object") {
    throw new EngineError("invalid-argument", "form must be a generalized Schur form returned by qz", { argument: "form" });
  }
  const names = ["S", "T", "Q", "Z"] as const;
  for (const name of names) {
    if (!(form[name] instanceof Matrix)) {
      throw new EngineError("invalid-argument", `form.${name} must be a Matrix`, { argument: `form.${name}` });
    }
    requireSquareFinite(form[name], `form.${name}`);
  }
  const n = form.S.rows;
  for (const name of names) {
    if (form[name].rows !== n) {
      throw new EngineError("shape-mismatch", `form.${name} must be ${n}×${n} like form.S (it is ${form[name].rows}×${form[name].columns})`, {
        argument: `form.${name}`,
      });
    }
  }
  return n;
}
