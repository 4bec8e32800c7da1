/**
 * Moving poles by hand: conjugate pairs move together (the member with positive imaginary part
 * is the handle, its mirror follows), a real pole stays on the real axis, and arrow keys move the
 * focused pole by a step. Pure functions; the map only calls them.
 */
import type { PlotComplex } from "./plotTypes";

/** Relative tolerance for "this pole is real" and "these two are conjugates" (rounding level of eigenvalue solvers, with room). */
export const CONJUGATE_TOLERANCE = 1e-9;

const scaleOf = (p: PlotComplex) => Math.max(1, Math.hypot(p.re, p.im));

/** True when |im| is at rounding level relative to the pole's size. */
export function isRealPole(p: PlotComplex, tol = CONJUGATE_TOLERANCE): boolean {
  return Math.abs(p.im) <= tol * scaleOf(p);
}

/**
 * partner[i]: the index of pole i's conjugate mirror, or −1 for a real pole (or a complex pole
 * without a mirror in the list, which then moves alone). Each pole is used in at most one pair;
 * the nearest unused mirror wins.
 */
export function conjugatePartners(poles: readonly PlotComplex[], tol = CONJUGATE_TOLERANCE): number[] {
  const partner = poles.map(() => -1);
  for (let i = 0; i < poles.length; i++) {
    const p = poles[i]!;
    if (partner[i] !== -1 || isRealPole(p, tol) || p.im < 0) continue;
    let best = -1;
    let bestDistance = Infinity;
    for (let j = 0; j < poles.length; j++) {
      const q = poles[j]!;
      if (j === i || partner[j] !== -1 || q.im >= 0 || isRealPole(q, tol)) continue;
      const d = Math.hypot(q.re - p.re, q.im + p.im);
      if (d < bestDistance) { bestDistance = d; best = j; }
    }
    if (best >= 0 && bestDistance <= 1e3 * tol * scaleOf(p)) { partner[i] = best; partner[best] = i; }
  }
  return partner;
}

/** Whether pole i gets a drag handle: real poles, upper members of pairs, and unpaired complex poles. */
export function isDragHandle(poles: readonly PlotComplex[], index: number, partners = conjugatePartners(poles)): boolean {
  const p = poles[index]!;
  return partners[index] === -1 || p.im > 0;
}

/**
 * Where pole `index` may go when the pointer asks for `target`: a real pole keeps im = 0; the
 * handle of a pair keeps im ≥ 0 (dropped onto the axis, the pair becomes a double real pole).
 */
export function constrainPoleTarget(poles: readonly PlotComplex[], index: number, target: PlotComplex, partners = conjugatePartners(poles)): PlotComplex {
  const p = poles[index]!;
  if (partners[index] === -1 && isRealPole(p)) return { re: target.re, im: 0 };
  if (partners[index] !== -1) return { re: target.re, im: Math.max(0, target.im) };
  return { re: target.re, im: target.im };
}

/**
 * The pole list after moving pole `index` toward `target`: the constrained location replaces the
 * pole, its mirror (if any) becomes the conjugate. Returns a new array; the input is not changed.
 */
export function movePole(poles: readonly PlotComplex[], index: number, target: PlotComplex): PlotComplex[] {
  if (!(index >= 0 && index < poles.length)) throw new Error(`pole index ${index} is outside 0…${poles.length - 1}`);
  if (!Number.isFinite(target.re) || !Number.isFinite(target.im)) throw new Error("a pole can only be moved to a finite location");
  const partners = conjugatePartners(poles);
  const at = constrainPoleTarget(poles, index, target, partners);
  const out = poles.map((p) => ({ re: p.re, im: p.im }));
  out[index] = at;
  const j = partners[index]!;
  if (j >= 0) out[j] = { re: at.re, im: -at.im };
  return out;
}

/**
 * The displacement an arrow key asks for: ←/→ move the real part, ↑/↓ the imaginary part, by
 * `step` (10 × with Shift). Other keys: null.
 */
export function arrowKeyDelta(key: string, step: number, shift = false): PlotComplex | null {
  const s = shift ? 10 * step : step;
  switch (key) {
    case "ArrowLeft": return { re: -s, im: 0 };
    case "ArrowRight": return { re: s, im: 0 };
    case "ArrowUp": return { re: 0, im: s };
    case "ArrowDown": return { re: 0, im: -s };
    default: return null;
  }
}

/** A keyboard step: about 1 % of the visible span, rounded down to 1, 2 or 5 × 10^k. */
export function niceStep(span: number): number {
  const raw = Math.abs(span) / 100;
  if (!(raw > 0) || !Number.isFinite(raw)) return 0.01;
  const k = Math.floor(Math.log10(raw));
  const m = raw / 10 ** k;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * 10 ** k;
}
