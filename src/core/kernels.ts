/**
 * The WebAssembly kernels (kernels.wat, 128-bit SIMD) and the memory they work in.
 *
 * A `Workspace` is one WebAssembly memory with a bump allocator handing out 16-byte aligned
 * Float64Array regions. A factorization's own workspace is sized once and never grown (so
 * JavaScript views of it stay valid); the factor lives in it, so the kernels and the JavaScript
 * code around them read the same storage, and it is released with the factorization by the
 * garbage collector. Work that keeps nothing afterwards uses one shared scratch workspace
 * (`Workspace.scratch`), grown when needed.
 *
 * Every kernel has a JavaScript twin (qr.ts, refine.ts, gram.ts) that is used when WebAssembly
 * with SIMD is not available, or when a fit is made with the option `kernels: false` (tests compare both).
 * The module is compiled synchronously when the platform allows it (Node.js; browsers allow
 * small modules) and otherwise in the background, the JavaScript twins serving until it is ready.
 */
import { KERNELS_WASM_BASE64 } from "./kernels.wasm";

export interface KernelExports {
  fused(col: number, lo: number, scale: number, alpha: number, s: number, comp: number, vh: number, vl: number, m: number, c0: number): number;
  group(v0: number, v1: number, v2: number, v3: number, r0: number, m: number, t: number, c: number, transpose: number): void;
  dot2(col: number, lo: number, scale: number, vh: number, vl: number, m: number, c0: number, out: number, vlo: number): void;
  axpy2(col: number, lo: number, scale: number, alpha: number, alphaLo: number, s: number, comp: number, m: number): void;
  lev(panel: number, nk: number, rows: number, ld: number, scales: number, R: number, z: number, h: number): void;
  gram(panel: number, lo: number, nk: number, rows: number, ld: number, scales: number, v: number, h: number, l: number, w: number, s1h: number, s1l: number, s2h: number, s2l: number): void;
}

let compiled: WebAssembly.Module | null = null;
let failed = false;

/** The module's bytes, decoded from base64 here (no atob: some hosts' sandboxes lack it). */
function bytes(): Uint8Array<ArrayBuffer> {
  const text = KERNELS_WASM_BASE64;
  const code = (c: number): number => (c >= 65 && c <= 90 ? c - 65 : c >= 97 && c <= 122 ? c - 71 : c >= 48 && c <= 57 ? c + 4 : c === 43 ? 62 : 63);
  let n = (text.length / 4) * 3;
  if (text.endsWith("==")) n -= 2;
  else if (text.endsWith("=")) n -= 1;
  const out = new Uint8Array(new ArrayBuffer(n));
  for (let i = 0, o = 0; i < text.length; i += 4) {
    const v = (code(text.charCodeAt(i)) << 18) | (code(text.charCodeAt(i + 1)) << 12) | (code(text.charCodeAt(i + 2)) << 6) | code(text.charCodeAt(i + 3));
    if (o < n) out[o++] = v >>> 16;
    if (o < n) out[o++] = (v >>> 8) & 255;
    if (o < n) out[o++] = v & 255;
  }
  return out;
}

function load(): WebAssembly.Module | null {
  if (compiled || failed) return compiled;
  if (typeof WebAssembly !== "object" || typeof WebAssembly.Module !== "function") {
    failed = true;
    return null;
  }
  const b = bytes();
  try {
    if (!WebAssembly.validate(b)) {
      failed = true; // no SIMD on this platform: JavaScript kernels
      return null;
    }
    compiled = new WebAssembly.Module(b);
  } catch {
    // Synchronous compilation refused (e.g. a browser's main thread): compile in the background.
    failed = true;
    WebAssembly.compile(b).then(
      (mod) => {
        compiled = mod;
        failed = false;
      },
      () => undefined,
    );
  }
  return compiled;
}

/** Whether the WebAssembly kernels can run here (a fit uses them unless its options say `kernels: false`). */
export function kernelsAvailable(): boolean {
  return load() !== null;
}

const PAGE = 65536;

/** Largest shared scratch workspace kept between calls, in doubles (32 MiB): larger work gets a workspace of its own, freed afterwards. */
const SCRATCH_CAP = 2 ** 22;
/** The same cap in bytes (part of the add-in's memory budget, functions/budget.ts). */
export const SCRATCH_BYTES = SCRATCH_CAP * 8 + 2 * 65536;

export class Workspace {
  readonly memory: WebAssembly.Memory;
  readonly k: KernelExports;
  /** The whole memory as doubles (replaced when the shared scratch workspace grows). */
  f64: Float64Array;
  private top = 2; // offset 0 stays unused, so a zero pointer can mean "none"
  private static shared: Workspace | null = null;

  /** Bytes the shared scratch workspace holds now (0 before first use); part of the memory budget. */
  static scratchBytes(): number {
    return Workspace.shared ? Workspace.shared.memory.buffer.byteLength : 0;
  }

  private constructor(memory: WebAssembly.Memory, k: KernelExports) {
    this.memory = memory;
    this.k = k;
    this.f64 = new Float64Array(memory.buffer);
  }

  /**
   * The shared scratch workspace, emptied and grown to hold `doubles`, for work that keeps no view
   * of it after it returns (the fast path, leverage). Reusing one memory spares each call a fresh
   * allocation (and the page faults and garbage collections that come with it). Above SCRATCH_CAP
   * a workspace of its own is made instead. Null when the kernels are not available.
   */
  static scratch(doubles: number): Workspace | null {
    if (doubles > SCRATCH_CAP) return Workspace.create(doubles);
    let ws = Workspace.shared;
    if (!ws) {
      if (!load()) return null;
      ws = Workspace.make(Math.ceil((SCRATCH_CAP * 8 + 64) / PAGE) + 1, doubles);
      if (!ws) return null;
      Workspace.shared = ws;
    }
    const need = Math.ceil((doubles * 8 + 64) / PAGE) + 1 - ws.memory.buffer.byteLength / PAGE;
    if (need > 0) {
      try {
        ws.memory.grow(need);
      } catch {
        return Workspace.create(doubles);
      }
      ws.f64 = new Float64Array(ws.memory.buffer);
    }
    ws.top = 2;
    return ws;
  }

  private static make(maxPages: number, doubles: number): Workspace | null {
    const mod = load();
    if (!mod) return null;
    const pages = Math.ceil((doubles * 8 + 64) / PAGE) + 1;
    if (pages > 65536) return null;
    try {
      const memory = new WebAssembly.Memory({ initial: pages, maximum: Math.max(pages, maxPages) });
      const inst = new WebAssembly.Instance(mod, { env: { memory } });
      return new Workspace(memory, inst.exports as unknown as KernelExports);
    } catch {
      return null;
    }
  }

  /**
   * A workspace able to hold `doubles` doubles in regions of any sizes (each region is rounded up
   * to an even count of doubles), or null when the kernels are not available or memory is refused.
   */
  static create(doubles: number): Workspace | null {
    return Workspace.make(0, doubles);
  }

  /**
   * A new region of n doubles (16-byte aligned): zero when the memory is fresh, but after a
   * `release` it holds whatever was there, so callers write before they read. Throws when the
   * workspace is full.
   */
  alloc(n: number): Float64Array {
    const start = this.top;
    const end = start + n + (n & 1);
    if (end > this.f64.length) throw new Error("workspace exhausted");
    this.top = end;
    return this.f64.subarray(start, start + n);
  }

  /** Current allocation mark, to release everything allocated after it with `release`. */
  mark(): number {
    return this.top;
  }

  release(mark: number): void {
    this.top = mark;
  }

  /** Whether `a` lives in this workspace's memory. */
  holds(a: Float64Array): boolean {
    return a.buffer === this.memory.buffer;
  }
}
