/**
 * A WebAssembly SIMD kernel for the hottest loop of global-neighbourhood kriging: the forward
 * solve L·X = B for eight right-hand sides at once (the variance of eight targets), two doubles
 * per instruction. It performs exactly the same IEEE operations in the same order as the
 * TypeScript `forwardSolveGroup` (a multiply, then a subtract), so results are bit-identical;
 * the TypeScript version is used wherever WebAssembly SIMD is unavailable.
 *
 * The module is assembled here from its instruction list (no toolchain needed); the listing in
 * the comments is the WebAssembly text form of the same code.
 */

// (func $fwd8 (param $L i32) (param $inv i32) (param $B i32) (param $m i32)
//   (local $i i32) (local $spare i32) (local $row i32) (local $bi i32) (local $bk i32) (local $end i32)
//   (local $s0 v128) (local $s1 v128) (local $s2 v128) (local $s3 v128) (local $v v128)
//   loop over rows i = 0 … m−1:
//     $row = $L + 8·m·i ; $bi = $B + 64·i
//     $s0…$s3 = v128.load $bi (+0, +16, +32, +48)
//     loop over k = 0 … i−1 ($row advancing by 8, $bk = $B + 64·k):
//       $v = f64x2.splat (f64.load $row)
//       $sj = f64x2.sub $sj (f64x2.mul $v (v128.load $bk +16·j))   for j = 0 … 3
//     $v = f64x2.splat (f64.load $inv + 8·i)
//     v128.store $bi +16·j (f64x2.mul $sj $v)                      for j = 0 … 3

const I32 = 0x7f;
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
/** Signed LEB128 (small values). */
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

// opcodes
const get = (l: number) => [0x20, ...uleb(l)];
const set = (l: number) => [0x21, ...uleb(l)];
const i32c = (v: number) => [0x41, ...sleb(v)];
const add = [0x6a];
const mul = [0x6c];
const geS = [0x4e];
const f64load = (offset: number) => [0x2b, 3, ...uleb(offset)];
const vload = (offset: number) => [0xfd, 0x00, 4, ...uleb(offset)];
const vstore = (offset: number) => [0xfd, 0x0b, 4, ...uleb(offset)];
const splat = [0xfd, 0x14];
const fsub = [0xfd, ...uleb(241)];
const fmul = [0xfd, ...uleb(242)];
const block = [0x02, 0x40];
const loop = [0x03, 0x40];
const brIf = (d: number) => [0x0d, ...uleb(d)];
const br = (d: number) => [0x0c, ...uleb(d)];
const end = [0x0b];

// locals: params 0..3, then i32 ×6 (4..9), v128 ×5 (10..14)
const [pL, pInv, pB, pM] = [0, 1, 2, 3];
const [lI, _lSpare, lRow, lBi, lBk, lEnd] = [4, 5, 6, 7, 8, 9]; // local 5 is unused
const [s0, s1, s2, s3, lV] = [10, 11, 12, 13, 14];
const S = [s0, s1, s2, s3];

function fwd8Body(): number[] {
  const code: number[] = [];
  const emit = (...parts: number[][]) => parts.forEach((p) => code.push(...p));
  emit(i32c(0), set(lI));
  emit(block, loop);
  // if i >= m: break
  emit(get(lI), get(pM), geS, brIf(1));
  // row = L + i*m*8 ; bi = B + i*64
  emit(get(pL), get(lI), get(pM), mul, i32c(8), mul, add, set(lRow));
  emit(get(pB), get(lI), i32c(64), mul, add, set(lBi));
  for (let j = 0; j < 4; j++) emit(get(lBi), vload(16 * j), set(S[j]));
  // end = row + 8*i (stop when the row pointer reaches the diagonal); bk = B
  emit(get(lRow), get(lI), i32c(8), mul, add, set(lEnd));
  emit(get(pB), set(lBk));
  emit(block, loop);
  emit(get(lRow), get(lEnd), geS, brIf(1));
  emit(get(lRow), f64load(0), splat, set(lV));
  for (let j = 0; j < 4; j++) emit(get(S[j]), get(lV), get(lBk), vload(16 * j), fmul, fsub, set(S[j]));
  emit(get(lRow), i32c(8), add, set(lRow));
  emit(get(lBk), i32c(64), add, set(lBk));
  emit(br(0), end, end);
  // scale by 1/L_ii and store
  emit(get(pInv), get(lI), i32c(8), mul, add, f64load(0), splat, set(lV));
  for (let j = 0; j < 4; j++) emit(get(lBi), get(S[j]), get(lV), fmul, vstore(16 * j));
  emit(get(lI), i32c(1), add, set(lI));
  emit(br(0), end, end);
  emit(end);
  return code;
}

function assemble(): Uint8Array<ArrayBuffer> {
  const body = fwd8Body();
  const locals = [2, ...uleb(6), I32, ...uleb(5), V128];
  const func = [...locals, ...body];
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, // magic, version 1
    ...section(1, [1, 0x60, 4, I32, I32, I32, I32, 0]), // type: (i32 i32 i32 i32) -> ()
    ...section(3, [1, 0]), // function 0 has type 0
    ...section(5, [1, 0x00, 1]), // memory: min 1 page, no max
    ...section(7, [2, ...str("fwd8"), 0x00, 0, ...str("memory"), 0x02, 0]), // exports
    ...section(10, [1, ...uleb(func.length), ...func]), // code
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

/** Whether the SIMD kernel can be used here. */
export function wasmSimdAvailable(): boolean {
  return module() !== null;
}

/**
 * One m × m lower-triangular factor held in WebAssembly memory, solving eight right-hand sides
 * at a time (interleaved as in forwardSolveGroup).
 */
export class WasmGroupSolver {
  private readonly m: number;
  private readonly fwd8: (L: number, inv: number, B: number, m: number) => void;
  private readonly view: Float64Array;
  private readonly offL = 0;
  private readonly offInv: number;
  private readonly offB: number;

  private constructor(m: number, mod: WebAssembly.Module) {
    this.m = m;
    const instance = new WebAssembly.Instance(mod, {});
    const memory = instance.exports.memory as WebAssembly.Memory;
    const doubles = m * m + m + 8 * m;
    const pages = Math.ceil((doubles * 8) / 65536);
    if (pages > 1) memory.grow(pages - 1);
    this.view = new Float64Array(memory.buffer);
    this.offInv = m * m;
    this.offB = m * m + m;
    this.fwd8 = instance.exports.fwd8 as (L: number, inv: number, B: number, m: number) => void;
  }

  /** A solver for L (lower triangle, row stride `stride`), or null without WebAssembly SIMD. */
  static create(L: Float64Array, invDiag: Float64Array, m: number, stride: number): WasmGroupSolver | null {
    const mod = module();
    if (!mod) return null;
    const s = new WasmGroupSolver(m, mod);
    for (let i = 0; i < m; i++) {
      s.view.set(L.subarray(i * stride, i * stride + i + 1), i * m);
      s.view[s.offInv + i] = invDiag[i];
    }
    return s;
  }

  /** Solve in place: b holds 8·m interleaved values (b[8i + c]). */
  solve(b: Float64Array): void {
    const m = this.m;
    this.view.set(b.subarray(0, 8 * m), this.offB);
    this.fwd8(this.offL * 8, this.offInv * 8, this.offB * 8, m);
    b.set(this.view.subarray(this.offB, this.offB + 8 * m));
  }
}
