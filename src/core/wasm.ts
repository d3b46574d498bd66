// Loading the wasm core and moving arrays in and out of its memory: the one place on
// the TypeScript side that touches wasm memory (see assembly/memory.ts for the layout).

/** The functions the core exports (assembly/index.ts); `p` is a problem block (assembly/problem.ts). */
export interface CoreExports {
  memory: WebAssembly.Memory;
  arenaReset(): void;
  arenaAlloc(bytes: number): number;
  arenaUsed(): number;
  arenaRelease(used: number): void;
  problemCreate(system: number, dim: number, mode: number, n: number, dt: number, m: number,
    drive: number, nDrive: number, driveDt: number, driveValues: number,
    bound: number, zeroEdges: number, rabiMax: number, smoothness: number,
    memory: number, gradientTolerance: number, held: number): number;
  problemFree(p: number): void;
  problemBuffer(p: number, which: number): number;
  problemFigure(p: number): number;
  problemGradient(p: number): number;
  problemDrive(p: number): void;
  problemInfidelity(p: number): number;
  problemVariables(p: number): number;
  problemSeries(p: number): number;
  controlsFromVariables(p: number, xPtr: number): void;
  objective(p: number, xPtr: number, gPtr: number): number;
  blochPath(iPtr: number, qPtr: number, n: number, dt: number, scale: number, detuning: number,
    targetPtr: number, outPtr: number): void;
  optInit(p: number, x0: number): number;
  optStep(p: number): number;
  optObjective(p: number): number;
  optGradientNorm(p: number): number;
  optVariables(p: number): number;
  optGradient(p: number): number;
  optEvaluations(p: number): number;
  optIterations(p: number): number;
  optStoredPairs(p: number): number;
  optMoveTo(p: number, xPtr: number, forget: number): number;
}

/** Status codes of optStep (assembly/lbfgs.ts). */
export const STEP_OK = 0;
export const STEP_GRADIENT_TOLERANCE = 1;
export const STEP_LINE_SEARCH_FAILED = 2;

/** A loaded core with helpers to place and read f64 arrays in its arena. */
export class Core {
  readonly exports: CoreExports;
  constructor(instance: WebAssembly.Instance) {
    this.exports = instance.exports as unknown as CoreExports;
  }
  /**
   * Run a job whose buffers live only while `fn` runs: they are carved above the
   * arena's current top and released when it returns (or throws), so jobs nest.
   */
  job<T>(fn: () => T): T {
    const mark = this.exports.arenaUsed();
    try {
      return fn();
    } finally {
      this.exports.arenaRelease(mark);
    }
  }
  /** The arena's current top, to release back to with `release` (for jobs that span awaits). */
  mark(): number {
    return this.exports.arenaUsed();
  }
  /** Free every buffer allocated since `mark`. */
  release(mark: number): void {
    this.exports.arenaRelease(mark);
  }
  /** Room for `count` f64 values; throws when memory cannot grow. */
  alloc(count: number): number {
    const ptr = this.exports.arenaAlloc(Math.max(1, count) * 8);
    if (ptr === 0) throw new RangeError(`the core could not allocate ${count} values (memory exhausted)`);
    return ptr;
  }
  /** Copy values into a new arena buffer. */
  put(values: ArrayLike<number>): number {
    const ptr = this.alloc(values.length);
    this.view(ptr, values.length).set(values);
    return ptr;
  }
  /** A live view of `count` f64 at `ptr` (invalid once memory grows: use at once). */
  view(ptr: number, count: number): Float64Array {
    return new Float64Array(this.exports.memory.buffer, ptr, count);
  }
  /** A copy of `count` f64 at `ptr`. */
  read(ptr: number, count: number): Float64Array {
    return this.view(ptr, count).slice();
  }
}

let current: Core | null = null;

/** Instantiate the core from its bytes or a compiled module (browser workers and Node). */
export async function loadCore(source: BufferSource | WebAssembly.Module | URL | string): Promise<Core> {
  let module: WebAssembly.Module;
  if (source instanceof WebAssembly.Module) module = source;
  else if (typeof source === 'string' || source instanceof URL) {
    const response = await fetch(source);
    if (!response.ok) throw new Error(`cannot load the wasm core from ${String(source)}: HTTP ${response.status}`);
    module = await WebAssembly.compile(await response.arrayBuffer());
  } else module = await WebAssembly.compile(source);
  current = new Core(await WebAssembly.instantiate(module, { env: { abort: coreAbort } }));
  return current;
}

function coreAbort(): never {
  throw new Error('the wasm core aborted');
}

/**
 * The loaded core; in Node it is loaded on first use from build/gatesmith.wasm.
 * In a browser call loadCore first.
 */
export function getCore(): Core {
  if (current) return current;
  const fs = nodeFs();
  if (!fs) throw new Error('the wasm core is not loaded: call initCore(url) first');
  const url = new URL('../../build/gatesmith.wasm', import.meta.url);
  let bytes: Uint8Array;
  try {
    bytes = fs.readFileSync(url);
  } catch {
    throw new Error(`the wasm core ${url.pathname} is missing: run "npm run build:wasm" (npm install runs it)`);
  }
  const module = new WebAssembly.Module(bytes as BufferSource);
  current = new Core(new WebAssembly.Instance(module, { env: { abort: coreAbort } }));
  return current;
}

function nodeFs(): { readFileSync(path: URL): Uint8Array } | null {
  const proc = (globalThis as { process?: { getBuiltinModule?: (name: string) => unknown } }).process;
  const mod = proc?.getBuiltinModule?.('node:fs');
  return (mod as { readFileSync(path: URL): Uint8Array } | undefined) ?? null;
}
