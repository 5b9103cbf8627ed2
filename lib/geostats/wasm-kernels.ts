/**
 * WebAssembly SIMD kernels for the two hot loops of kriging, two doubles per instruction:
 * - `fwd8`: the forward solve L·X = B for eight right-hand sides at once (eight targets'
 *   variances with the global neighbourhood; the drift columns and values of a new neighbour set);
 * - `chol`: the Cholesky factorisation of a neighbour set's covariance block.
 * Each performs exactly the same IEEE operations in the same order as its TypeScript twin in
 * linalg.ts (`forwardSolveGroup`, `cholesky` with `dot`), so results are bit-identical; the
 * TypeScript versions run wherever WebAssembly SIMD is unavailable.
 *
 * The module is assembled here from its instruction list (no toolchain needed); the comments
 * give the same code in WebAssembly text form.
 */

const I32 = 0x7f;
const F64 = 0x7c;
const V128 = 0x7b;

/** Unsigned LEB128. */
function uleb(n: number): number[] {
  const out: number[] = [];
  do {
    let b = n & 0x7f;
    n >>>= 7;
    if (n !== 0) b |= 0x80;
    out.push(b);
  } while (n !== 0);
  return out;
}
/** Signed LEB128 (32-bit values). */
function sleb(n: number): number[] {
  const out: number[] = [];
  for (;;) {
    const b = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (b & 0x40) === 0) || (n === -1 && (b & 0x40) !== 0)) {
      out.push(b);
      return out;
    }
    out.push(b | 0x80);
  }
}
function section(id: number, body: number[]): number[] {
  return [id, ...uleb(body.length), ...body];
}
function str(s: string): number[] {
  return [...uleb(s.length), ...Array.from(s, (c) => c.charCodeAt(0))];
}

// ---- opcodes
const get = (l: number) => [0x20, ...uleb(l)];
const set = (l: number) => [0x21, ...uleb(l)];
const i32c = (v: number) => [0x41, ...sleb(v)];
const f64c = (v: number) => [0x44, ...new Uint8Array(new Float64Array([v]).buffer)];
const iadd = [0x6a];
const imul = [0x6c];
const iand = [0x71];
const geS = [0x4e];
const geU = [0x4f];
const ieqz = [0x45];
const fadd = [0xa0];
const fsubS = [0xa1];
const fmulS = [0xa2];
const fdiv = [0xa3];
const fsqrt = [0x9f];
const fgt = [0x64];
const f64load = (offset: number) => [0x2b, 3, ...uleb(offset)];
const f64store = (offset: number) => [0x39, 3, ...uleb(offset)];
const vload = (offset: number) => [0xfd, 0x00, 4, ...uleb(offset)];
const vstore = (offset: number) => [0xfd, 0x0b, 4, ...uleb(offset)];
const splat = [0xfd, 0x14];
const lane = (l: number) => [0xfd, 0x21, l]; // f64x2.extract_lane
const vadd = [0xfd, ...uleb(240)];
const vsub = [0xfd, ...uleb(241)];
const vmul = [0xfd, ...uleb(242)];
const block = [0x02, 0x40];
const loop = [0x03, 0x40];
const ifThen = [0x04, 0x40];
const ret = [0x0f];
const brIf = (d: number) => [0x0d, ...uleb(d)];
const br = (d: number) => [0x0c, ...uleb(d)];
const end = [0x0b];

function emitter(): { code: number[]; emit: (...parts: number[][]) => void } {
  const code: number[] = [];
  return { code, emit: (...parts) => parts.forEach((p) => code.push(...p)) };
}

// ---- fwd8
// (func $fwd8 (param $L i32) (param $inv i32) (param $B i32) (param $m i32)
//   (local $i i32) (local $row i32) (local $bi i32) (local $bk i32) (local $end i32)
//   (local $s0 v128) (local $s1 v128) (local $s2 v128) (local $s3 v128) (local $v v128)
//   for i = 0 … m−1:
//     $row = $L + 8·m·i ; $bi = $B + 64·i ; $sj = v128.load $bi +16·j
//     for k = 0 … i−1 ($row advancing by 8, $bk = $B + 64·k):
//       $v = f64x2.splat (f64.load $row)
//       $sj = f64x2.sub $sj (f64x2.mul $v (v128.load $bk +16·j))        j = 0 … 3
//     $v = f64x2.splat (f64.load $inv + 8·i)
//     v128.store $bi +16·j (f64x2.mul $sj $v)                           j = 0 … 3
function fwd8(): number[] {
  const [pL, pInv, pB, pM] = [0, 1, 2, 3];
  const [lI, lRow, lBi, lBk, lEnd] = [4, 5, 6, 7, 8];
  const S = [9, 10, 11, 12];
  const lV = 13;
  const { code, emit } = emitter();
  emit(i32c(0), set(lI));
  emit(block, loop);
  emit(get(lI), get(pM), geS, brIf(1));
  emit(get(pL), get(lI), get(pM), imul, i32c(8), imul, iadd, set(lRow));
  emit(get(pB), get(lI), i32c(64), imul, iadd, set(lBi));
  for (let j = 0; j < 4; j++) emit(get(lBi), vload(16 * j), set(S[j]));
  emit(get(lRow), get(lI), i32c(8), imul, iadd, set(lEnd));
  emit(get(pB), set(lBk));
  emit(block, loop);
  emit(get(lRow), get(lEnd), geS, brIf(1));
  emit(get(lRow), f64load(0), splat, set(lV));
  for (let j = 0; j < 4; j++) emit(get(S[j]), get(lV), get(lBk), vload(16 * j), vmul, vsub, set(S[j]));
  emit(get(lRow), i32c(8), iadd, set(lRow));
  emit(get(lBk), i32c(64), iadd, set(lBk));
  emit(br(0), end, end);
  emit(get(pInv), get(lI), i32c(8), imul, iadd, f64load(0), splat, set(lV));
  for (let j = 0; j < 4; j++) emit(get(lBi), get(S[j]), get(lV), vmul, vstore(16 * j));
  emit(get(lI), i32c(1), iadd, set(lI));
  emit(br(0), end, end);
  emit(end);
  const locals = [2, ...uleb(5), I32, ...uleb(5), V128];
  return [...locals, ...code];
}

// ---- chol (returns −1, or the row whose pivot is not positive enough)
// (func $chol (param $A i32) (param $m i32) (param $tol f64) (result i32)
//   (local $j i32) (local $i i32) (local $rowJ i32) (local $rowI i32) (local $k i32) (local $lim i32)
//   (local $d f64) (local $ajj f64) (local $inv f64) (local $s0 f64) (local $s1 f64) (local $s2 f64) (local $s3 f64)
//   (local $a v128) (local $b v128)
//   for j = 0 … m−1:
//     $rowJ = $A + 8·m·j ; $ajj = A[j][j] ; $d = $ajj − dot(row j, row j, j)
//     if !($d > $tol·$ajj and $ajj > 0): return j
//     A[j][j] = sqrt $d ; $inv = 1 / sqrt $d
//     for i = j+1 … m−1: A[i][j] = (A[i][j] − dot(row i, row j, j)) · $inv
//   return −1
// dot(x, y, len): lanes (s0, s1) and (s2, s3) accumulate x[k]·y[k] over k mod 4 for the whole
// blocks of four, the rest goes into s0, result (s0 + s1) + (s2 + s3) — as linalg.ts's dot.
function chol(): number[] {
  const [pA, pM, pTol] = [0, 1, 2];
  const [lJ, lI, lRowJ, lRowI, lK, lLim] = [3, 4, 5, 6, 7, 8];
  const [lD, lAjj, lInv, s0, s1, s2, s3] = [9, 10, 11, 12, 13, 14, 15];
  const [va, vb] = [16, 17];
  const { code, emit } = emitter();
  /** Pushes dot(row x, row y, j) (f64). */
  const dot = (rowX: number, rowY: number) => {
    emit(f64c(0), splat, set(va), f64c(0), splat, set(vb));
    emit(i32c(0), set(lK));
    emit(get(lJ), i32c(-4), iand, i32c(8), imul, set(lLim));
    emit(block, loop);
    emit(get(lK), get(lLim), geU, brIf(1));
    emit(get(va), get(rowX), get(lK), iadd, vload(0), get(rowY), get(lK), iadd, vload(0), vmul, vadd, set(va));
    emit(get(vb), get(rowX), get(lK), iadd, vload(16), get(rowY), get(lK), iadd, vload(16), vmul, vadd, set(vb));
    emit(get(lK), i32c(32), iadd, set(lK));
    emit(br(0), end, end);
    emit(get(va), lane(0), set(s0), get(va), lane(1), set(s1), get(vb), lane(0), set(s2), get(vb), lane(1), set(s3));
    emit(get(lJ), i32c(8), imul, set(lLim));
    emit(block, loop);
    emit(get(lK), get(lLim), geU, brIf(1));
    emit(get(s0), get(rowX), get(lK), iadd, f64load(0), get(rowY), get(lK), iadd, f64load(0), fmulS, fadd, set(s0));
    emit(get(lK), i32c(8), iadd, set(lK));
    emit(br(0), end, end);
    emit(get(s0), get(s1), fadd, get(s2), get(s3), fadd, fadd);
  };
  emit(i32c(0), set(lJ));
  emit(block, loop);
  emit(get(lJ), get(pM), geS, brIf(1));
  emit(get(pA), get(lJ), get(pM), imul, i32c(8), imul, iadd, set(lRowJ));
  emit(get(lRowJ), get(lJ), i32c(8), imul, iadd, f64load(0), set(lAjj));
  emit(get(lAjj));
  dot(lRowJ, lRowJ);
  emit(fsubS, set(lD));
  // if !(d > tol·ajj && ajj > 0) return j
  emit(get(lD), get(pTol), get(lAjj), fmulS, fgt, get(lAjj), f64c(0), fgt, iand, ieqz, ifThen, get(lJ), ret, end);
  emit(get(lRowJ), get(lJ), i32c(8), imul, iadd, get(lD), fsqrt, f64store(0));
  emit(f64c(1), get(lD), fsqrt, fdiv, set(lInv));
  emit(get(lJ), i32c(1), iadd, set(lI));
  emit(block, loop);
  emit(get(lI), get(pM), geS, brIf(1));
  emit(get(pA), get(lI), get(pM), imul, i32c(8), imul, iadd, set(lRowI));
  // A[i][j] = (A[i][j] − dot) · inv
  emit(get(lRowI), get(lJ), i32c(8), imul, iadd);
  emit(get(lRowI), get(lJ), i32c(8), imul, iadd, f64load(0));
  dot(lRowI, lRowJ);
  emit(fsubS, get(lInv), fmulS, f64store(0));
  emit(get(lI), i32c(1), iadd, set(lI));
  emit(br(0), end, end);
  emit(get(lJ), i32c(1), iadd, set(lJ));
  emit(br(0), end, end);
  emit(i32c(-1), end);
  const locals = [3, ...uleb(6), I32, ...uleb(7), F64, ...uleb(2), V128];
  return [...locals, ...code];
}

function assemble(): Uint8Array<ArrayBuffer> {
  const f1 = fwd8();
  const f2 = chol();
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, // magic, version 1
    // types: 0 = (i32 i32 i32 i32) → (), 1 = (i32 i32 f64) → i32
    ...section(1, [2, 0x60, 4, I32, I32, I32, I32, 0, 0x60, 3, I32, I32, F64, 1, I32]),
    ...section(3, [2, 0, 1]), // functions: fwd8 : type 0, chol : type 1
    ...section(5, [1, 0x00, 1]), // memory: min 1 page, no max
    ...section(7, [3, ...str("fwd8"), 0x00, 0, ...str("chol"), 0x00, 1, ...str("memory"), 0x02, 0]),
    ...section(10, [2, ...uleb(f1.length), ...f1, ...uleb(f2.length), ...f2]),
  ];
  return new Uint8Array(bytes);
}

let compiled: WebAssembly.Module | null | undefined;

function module(): WebAssembly.Module | null {
  if (compiled !== undefined) return compiled;
  try {
    const bytes = assemble();
    compiled = typeof WebAssembly === "object" && WebAssembly.validate(bytes) ? new WebAssembly.Module(bytes) : null;
  } catch {
    compiled = null;
  }
  return compiled;
}

/** Whether the SIMD kernels can be used here. */
export function wasmSimdAvailable(): boolean {
  return module() !== null;
}

/** A WebAssembly instance with its memory viewed as doubles, grown on demand. */
class Workspace {
  private readonly memory: WebAssembly.Memory;
  readonly fwd8: (L: number, inv: number, B: number, m: number) => void;
  readonly chol: (A: number, m: number, tol: number) => number;
  view: Float64Array;

  constructor(mod: WebAssembly.Module) {
    const instance = new WebAssembly.Instance(mod, {});
    this.memory = instance.exports.memory as WebAssembly.Memory;
    this.fwd8 = instance.exports.fwd8 as Workspace["fwd8"];
    this.chol = instance.exports.chol as Workspace["chol"];
    this.view = new Float64Array(this.memory.buffer);
  }

  /** Make room for `doubles` doubles. */
  reserve(doubles: number): void {
    const bytes = doubles * 8;
    if (bytes <= this.memory.buffer.byteLength) return;
    this.memory.grow(Math.ceil((bytes - this.memory.buffer.byteLength) / 65536));
    this.view = new Float64Array(this.memory.buffer);
  }
}

/**
 * One m × m lower-triangular factor held in WebAssembly memory, solving eight right-hand sides
 * at a time (interleaved as in forwardSolveGroup). Used for the global neighbourhood.
 */
export class WasmGroupSolver {
  private readonly m: number;
  private readonly ws: Workspace;
  private readonly offInv: number;
  private readonly offB: number;

  private constructor(m: number, ws: Workspace) {
    this.m = m;
    this.ws = ws;
    this.offInv = m * m;
    this.offB = m * m + m; // even: 16-byte aligned
  }

  /** A solver for L (lower triangle, row stride `stride`), or null without WebAssembly SIMD. */
  static create(L: Float64Array, invDiag: Float64Array, m: number, stride: number): WasmGroupSolver | null {
    const mod = module();
    if (!mod) return null;
    const ws = new Workspace(mod);
    const s = new WasmGroupSolver(m, ws);
    ws.reserve(s.offB + 8 * m);
    for (let i = 0; i < m; i++) {
      ws.view.set(L.subarray(i * stride, i * stride + i + 1), i * m);
      ws.view[s.offInv + i] = invDiag[i];
    }
    return s;
  }

  /** Solve in place: b holds 8·m interleaved values (b[8i + c]). */
  solve(b: Float64Array): void {
    const m = this.m;
    const view = this.ws.view;
    view.set(b.subarray(0, 8 * m), this.offB);
    this.ws.fwd8(0, this.offInv * 8, this.offB * 8, m);
    b.set(view.subarray(this.offB, this.offB + 8 * m));
  }
}

/**
 * Scratch space for factorising neighbour systems (one per evaluator): Cholesky of an m × m
 * block and forward solves of up to eight right-hand sides with that factor.
 */
export class WasmFactoriser {
  private readonly ws: Workspace;
  private m = 0;

  private constructor(ws: Workspace) {
    this.ws = ws;
  }

  static create(): WasmFactoriser | null {
    const mod = module();
    return mod ? new WasmFactoriser(new Workspace(mod)) : null;
  }

  /**
   * Cholesky of the m × m block stored in `a` with row stride m (lower triangle used), in place.
   * Returns −1, or the row where the pivot fell below relTol × its diagonal element.
   */
  cholesky(a: Float64Array, m: number, relTol: number): number {
    this.m = m;
    const n = m * m;
    this.ws.reserve(n + m + 8 * m);
    this.ws.view.set(a.subarray(0, n), 0);
    const bad = this.ws.chol(0, m, relTol);
    a.set(this.ws.view.subarray(0, n));
    return bad;
  }

  /**
   * After cholesky(): solve L·X = B for eight interleaved right-hand sides (b[8i + c]) in place.
   * `invDiag` holds 1/L_ii.
   */
  forwardSolve8(invDiag: Float64Array, b: Float64Array): void {
    const m = this.m;
    const view = this.ws.view;
    const offInv = m * m;
    const offB = offInv + m;
    view.set(invDiag.subarray(0, m), offInv);
    view.set(b.subarray(0, 8 * m), offB);
    this.ws.fwd8(0, offInv * 8, offB * 8, m);
    b.set(view.subarray(offB, offB + 8 * m));
  }
}
