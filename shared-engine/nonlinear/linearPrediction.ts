/**
 * The linearized loop beside the nonlinear closed-loop simulation (simulateClosedLoop.ts):
 * propagated exactly between break points by matrix exponentials, with the same scenario events
 * and the same sampled controller updates as the nonlinear run.
 */
import { Matrix } from "ml-matrix";
import { expm } from "../linalg";
import { closedLoopMatrix } from "./closedLoopMatrix";

/** Exogenous signal changes of a scenario: disturbance steps (wv), ramp slopes (ws), set-point steps (dr). */
export interface Exogenous { wv: Float64Array; ws: Float64Array; dr: Float64Array }
/** A scenario event: at `time`, `apply` adds its change to the exogenous signals. */
export interface ScenarioEvent { time: number; apply: (exo: Exogenous) => void }

/**
 * Exact simulation of the linearized loop by matrix exponentials of an augmented system
 * s = [δx (n); ξ (r, continuous only); w (q); ẇ (q); δr (r); u_held (m, sampled only)].
 */
export class LinearPrediction {
  private readonly s: Float64Array;
  private readonly N: number;
  private readonly M: Matrix;
  private readonly cache = new Map<string, Matrix>();
  private readonly xi: Float64Array;
  private t = 0;
  private readonly o: { x: number; xi: number; wv: number; ws: number; dr: number; uh: number };

  constructor(
    private readonly A: Matrix, private readonly B: Matrix, private readonly C: Matrix, private readonly D: Matrix,
    private readonly F: Matrix, private readonly E: Matrix, private readonly K: Matrix, private readonly Ki: Matrix,
    private readonly tracked: number[], private readonly T: number | null,
  ) {
    const n = A.rows, m = B.columns, q = F.columns, r = tracked.length;
    const sampled = T !== null;
    const o = { x: 0, xi: n, wv: 0, ws: 0, dr: 0, uh: 0 };
    o.wv = o.xi + (sampled ? 0 : r);
    o.ws = o.wv + q;
    o.dr = o.ws + q;
    o.uh = o.dr + r;
    this.o = o;
    this.N = o.uh + (sampled ? m : 0);
    this.s = new Float64Array(this.N);
    this.xi = new Float64Array(r);
    const M = new Matrix(this.N, this.N);
    if (!sampled) {
      const Acl = closedLoopMatrix(A, B, C, D, K, Ki, tracked);
      for (let i = 0; i < n + r; i++) for (let j = 0; j < n + r; j++) M.set(i, j, Acl.get(i, j));
      for (let i = 0; i < n; i++) for (let j = 0; j < q; j++) M.set(i, o.wv + j, F.get(i, j));
      for (let i = 0; i < r; i++) {
        for (let j = 0; j < q; j++) M.set(o.xi + i, o.wv + j, E.get(tracked[i]!, j));
        M.set(o.xi + i, o.dr + i, -1);
      }
    } else {
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) M.set(i, j, A.get(i, j));
        for (let j = 0; j < m; j++) M.set(i, o.uh + j, B.get(i, j));
        for (let j = 0; j < q; j++) M.set(i, o.wv + j, F.get(i, j));
      }
    }
    for (let j = 0; j < q; j++) M.set(o.wv + j, o.ws + j, 1);
    this.M = M;
  }

  setInitial(dx: Float64Array): void { this.s.set(dx, this.o.x); }

  advanceTo(t: number): void {
    const dt = t - this.t;
    if (dt <= 0) return;
    const key = dt.toPrecision(14);
    let P = this.cache.get(key);
    if (P === undefined) {
      P = expm(this.M.clone().mul(dt));
      this.cache.set(key, P);
    }
    const next = new Float64Array(this.N);
    for (let i = 0; i < this.N; i++) {
      let v = 0;
      for (let j = 0; j < this.N; j++) v += P.get(i, j) * this.s[j]!;
      next[i] = v;
    }
    this.s.set(next);
    this.t = t;
  }

  applyEvent(event: ScenarioEvent): void {
    const q = this.F.columns, r = this.tracked.length;
    const exo: Exogenous = { wv: new Float64Array(q), ws: new Float64Array(q), dr: new Float64Array(r) };
    event.apply(exo);
    for (let j = 0; j < q; j++) { this.s[this.o.wv + j]! += exo.wv[j]!; this.s[this.o.ws + j]! += exo.ws[j]!; }
    for (let j = 0; j < r; j++) this.s[this.o.dr + j]! += exo.dr[j]!;
  }

  /** Sampled controller update at a sample instant: u_held = −Kδx − Kiξ; ξ += T·e. */
  sample(): void {
    const m = this.B.columns, r = this.tracked.length;
    const du = this.deltaU();
    for (let i = 0; i < m; i++) this.s[this.o.uh + i] = du[i]!;
    const dy = this.deltaY(du);
    for (let j = 0; j < r; j++) this.xi[j] = this.xi[j]! + this.T! * (dy[this.tracked[j]!]! - this.s[this.o.dr + j]!);
  }

  private deltaU(): Float64Array {
    const n = this.A.rows, m = this.B.columns, r = this.tracked.length;
    const xi = this.T === null ? this.s.subarray(this.o.xi, this.o.xi + r) : this.xi;
    const du = new Float64Array(m);
    for (let i = 0; i < m; i++) {
      let v = 0;
      for (let j = 0; j < n; j++) v -= this.K.get(i, j) * this.s[j]!;
      for (let j = 0; j < r; j++) v -= this.Ki.get(i, j) * xi[j]!;
      du[i] = v;
    }
    return du;
  }

  private deltaY(du: Float64Array): Float64Array {
    const n = this.A.rows, m = this.B.columns, q = this.F.columns, p = this.C.rows;
    const dy = new Float64Array(p);
    for (let i = 0; i < p; i++) {
      let v = 0;
      for (let j = 0; j < n; j++) v += this.C.get(i, j) * this.s[j]!;
      for (let j = 0; j < m; j++) v += this.D.get(i, j) * du[j]!;
      for (let j = 0; j < q; j++) v += this.E.get(i, j) * this.s[this.o.wv + j]!;
      dy[i] = v;
    }
    return dy;
  }

  signals(x0: Float64Array, u0: Float64Array, y0: Float64Array): { states: number[]; inputs: number[]; outputs: number[] } {
    const n = this.A.rows, m = this.B.columns;
    const du = this.T === null ? this.deltaU() : this.s.slice(this.o.uh, this.o.uh + m);
    const dy = this.deltaY(du);
    return {
      states: Array.from({ length: n }, (_, i) => x0[i]! + this.s[i]!),
      inputs: Array.from({ length: m }, (_, i) => u0[i]! + du[i]!),
      outputs: Array.from(dy, (v, i) => y0[i]! + v),
    };
  }
}
