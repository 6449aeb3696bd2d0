// Loader of the WebAssembly SIMD kernels (assembly/kernels.ts, bytes in kernelsWasm.generated.ts)
// and the workspaces they run in. The module is compiled once, synchronously (it is a few
// kilobytes); each KernelWorkspace is one instance with its own linear memory, into which the
// caller places matrices with a bump allocator. Callers fall back to the JavaScript kernels when
// simdAvailable() is false (an engine without WebAssembly SIMD, or GRAPH_CURATOR_SIMD=0).
import { kernelsWasmBase64 } from './kernelsWasm.generated';

/** The module's exports; pointers are byte offsets into the workspace's memory. */
export interface KernelExports {
  heapBase(): number;
  /** list: matMulListBytes(inner, cols) bytes of scratch. */
  matMul(a: number, b: number, c: number, rows: number, inner: number, cols: number, list: number): void;
  matMulTransposedA(a: number, g: number, c: number, rows: number, inner: number, cols: number, accumulate: number): void;
  /** scratch: cols × inner floats; list: matMulListBytes(cols, inner) bytes. */
  matMulTransposedB(g: number, w: number, c: number, rows: number, cols: number, inner: number, scratch: number, list: number): void;
  spmm(rowPtr: number, colIndex: number, values: number, dense: number, out: number, rowStart: number, rowEnd: number, cols: number): void;
  spmmTransposed(
    rowPtr: number,
    colIndex: number,
    values: number,
    dense: number,
    out: number,
    rowCount: number,
    colCount: number,
    cols: number,
  ): void;
  biasReluMask(h: number, bias: number, mask: number, rows: number, cols: number): void;
  addBias(z: number, bias: number, rows: number, cols: number): void;
  reluMaskBackward(d: number, activation: number, mask: number, n: number): void;
  columnSums(g: number, out: number, rows: number, cols: number): void;
}

/**
 * Bytes of scratch matMul needs: 8 blocks of rows with a count and up to `inner` indices each,
 * then the right-hand matrix's columns copied into contiguous panels (inner × columns floats).
 */
export function matMulListBytes(inner: number, columns: number): number {
  return ((8 * (inner + 1) * 4 + 15) & ~15) + inner * columns * 4;
}

const PAGE_BYTES = 65536;
// wasm32 addresses 4 GiB; V8 allows 65536 pages of 64 KiB.
const MAX_PAGES = 65536;

let compiledModule: WebAssembly.Module | null | undefined;
let enabled = typeof process === 'undefined' || process.env.GRAPH_CURATOR_SIMD !== '0';

/** The compiled kernel module, or null where WebAssembly SIMD is missing. */
export function kernelModule(): WebAssembly.Module | null {
  if (compiledModule === undefined) {
    try {
      const bytes = Uint8Array.from(atob(kernelsWasmBase64), (c) => c.charCodeAt(0));
      compiledModule = new WebAssembly.Module(bytes);
    } catch {
      // No WebAssembly, or no SIMD in this engine: compilation fails and the JS kernels run.
      compiledModule = null;
    }
  }
  return compiledModule;
}

/** Whether the SIMD kernels can run here (and are not switched off). */
export function simdAvailable(): boolean {
  return enabled && kernelModule() !== null;
}

/**
 * Switches the SIMD kernels off (false) or back on (true, when the engine supports them), for
 * side-by-side benchmarks and tests of the JavaScript fallback. Returns the previous setting.
 */
export function setSimdEnabled(on: boolean): boolean {
  const previous = enabled;
  enabled = on;
  return previous;
}

/** One kernel instance and its memory; matrices are placed by allocate and freed all at once by reset. */
export class KernelWorkspace {
  readonly kernels: KernelExports;
  private readonly memory: WebAssembly.Memory;
  private readonly base: number;
  private top: number;

  constructor(initialBytes = 0) {
    const module = kernelModule();
    if (!module) throw new Error('WebAssembly SIMD kernels are not available in this JavaScript engine');
    this.memory = new WebAssembly.Memory({ initial: 1, maximum: MAX_PAGES });
    const instance = new WebAssembly.Instance(module, { env: { memory: this.memory } });
    this.kernels = instance.exports as unknown as KernelExports;
    this.base = align(this.kernels.heapBase());
    this.top = this.base;
    if (initialBytes > 0) this.ensureCapacity(this.base + initialBytes);
  }

  /** Bytes of linear memory held (it only ever grows). */
  get byteLength(): number {
    return this.memory.buffer.byteLength;
  }

  /** Forgets every allocation (the memory stays). */
  reset(): void {
    this.top = this.base;
  }

  /**
   * Reserves `bytes` (16-byte aligned) and returns the pointer. Growing the memory detaches
   * views made before, so make views (floats, ints) only after the last allocate of a call.
   */
  allocate(bytes: number): number {
    const pointer = this.top;
    this.ensureCapacity(pointer + bytes);
    this.top = align(pointer + bytes);
    return pointer;
  }

  floats(pointer: number, length: number): Float32Array {
    return new Float32Array(this.memory.buffer, pointer, length);
  }

  ints(pointer: number, length: number): Int32Array {
    return new Int32Array(this.memory.buffer, pointer, length);
  }

  private ensureCapacity(bytes: number): void {
    const have = this.memory.buffer.byteLength;
    if (bytes <= have) return;
    const pages = Math.ceil((bytes - have) / PAGE_BYTES);
    if (have / PAGE_BYTES + pages > MAX_PAGES) {
      throw new Error(`SIMD kernels: ${(bytes / 2 ** 30).toFixed(2)} GiB do not fit in WebAssembly's 4 GiB memory`);
    }
    this.memory.grow(pages);
  }
}

function align(bytes: number): number {
  return (bytes + 15) & ~15;
}

// Products called through dense/matmul.ts and graph/spmm.ts copy their operands into one kept
// workspace; it is dropped when a call made it larger than this, so that one large product
// does not pin hundreds of megabytes for the life of the process.
const KEPT_WORKSPACE_BYTES = 64 << 20;
let keptWorkspace: KernelWorkspace | null = null;

/** Runs `use` with an empty workspace (the kept one when it is free), and resets it afterwards. */
export function withWorkspace<T>(use: (workspace: KernelWorkspace) => T): T {
  const workspace = keptWorkspace ?? new KernelWorkspace();
  keptWorkspace = null;
  try {
    workspace.reset();
    return use(workspace);
  } finally {
    workspace.reset();
    if (workspace.byteLength <= KEPT_WORKSPACE_BYTES) keptWorkspace = workspace;
  }
}
