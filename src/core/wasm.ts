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
  problemSetShares(p: number, on: number): void;
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
  /**
   * The member-share evaluators of blocks whose objective is split (member-split.ts): the
   * core's import memberShares(p) calls the one registered for p.
   */
  readonly shareEvaluators = new Map<number, () => number>();
  constructor(module: WebAssembly.Module) {
    const memberShares = (p: number): number => {
      const evaluate = this.shareEvaluators.get(p);
      if (!evaluate) throw new Error(`the core asked for member shares of block ${p}, which has none`);
      return evaluate();
    };
    const instance = new WebAssembly.Instance(module, { env: { abort: coreAbort, memberShares } });
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

/**
 * The two builds of the core, from the same sources (scripts/build.js): `portable` rounds
 * every multiply and add on its own, so it gives the same bits on every engine and CPU;
 * `fused` (relaxed SIMD) lets the engine fuse a * b + c into one rounding, which is faster
 * and changes the last bits. Designs use `portable` unless asked (the optimiser carries a
 * last-bit difference into another local optimum); a pulse file records its build.
 */
export type CoreBuild = 'portable' | 'fused';

/** The file name of each build in build/ (and in the package). */
export const CORE_FILES: Record<CoreBuild, string> = { portable: 'gatesmith.wasm', fused: 'gatesmith-fused.wasm' };

// A module of one function, f64x2.relaxed_madd of its three v128 parameters: the engine
// runs the fused build when it validates this (Chromium does; Node 20 with
// --experimental-wasm-relaxed-simd).
const RELAXED_PROBE = new Uint8Array([
  0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
  0x01, 0x08, 0x01, 0x60, 0x03, 0x7b, 0x7b, 0x7b, 0x01, 0x7b, // type: (v128 v128 v128) -> v128
  0x03, 0x02, 0x01, 0x00, // one function of that type
  0x0a, 0x0d, 0x01, 0x0b, 0x00, 0x20, 0x00, 0x20, 0x01, 0x20, 0x02, 0xfd, 0x87, 0x02, 0x0b, // its body
]);

let relaxedSupported: boolean | null = null;

/** True when this engine runs relaxed SIMD (the fused build). */
export function fusedAvailable(): boolean {
  relaxedSupported ??= WebAssembly.validate(RELAXED_PROBE);
  return relaxedSupported;
}

const loaded: Record<CoreBuild, Core | null> = { portable: null, fused: null };

async function compile(source: BufferSource | WebAssembly.Module | URL | string): Promise<WebAssembly.Module> {
  if (source instanceof WebAssembly.Module) return source;
  if (typeof source === 'string' || source instanceof URL) {
    const response = await fetch(source);
    if (!response.ok) throw new Error(`cannot load the wasm core from ${String(source)}: HTTP ${response.status}`);
    return WebAssembly.compile(await response.arrayBuffer());
  }
  return WebAssembly.compile(source);
}

/**
 * Instantiate the core from its bytes or a compiled module (browser workers and Node); with
 * `fused`, also the fused build where the engine runs relaxed SIMD (else it is not fetched).
 */
export async function loadCore(
  source: BufferSource | WebAssembly.Module | URL | string, fused?: BufferSource | WebAssembly.Module | URL | string,
): Promise<Core> {
  loaded.portable = new Core(await compile(source));
  if (fused !== undefined && fusedAvailable()) loaded.fused = new Core(await compile(fused));
  return loaded.portable;
}

function coreAbort(): never {
  throw new Error('the wasm core aborted');
}

/**
 * The build that runs when `wanted` is asked for: the fused build only where the engine
 * runs it (and, in a browser, where it was loaded), else the portable one.
 */
export function buildFor(wanted: CoreBuild): CoreBuild {
  if (wanted === 'portable' || !fusedAvailable()) return 'portable';
  return loaded.fused || nodeFs() ? 'fused' : 'portable';
}

/**
 * The loaded core of a build (default the portable one; see buildFor for what runs); in
 * Node it is loaded on first use from build/. In a browser call loadCore first.
 */
export function getCore(build: CoreBuild = 'portable'): Core {
  const which = buildFor(build);
  const ready = loaded[which];
  if (ready) return ready;
  const fs = nodeFs();
  if (!fs) throw new Error('the wasm core is not loaded: call initCore(url) first');
  const url = new URL(`../../build/${CORE_FILES[which]}`, import.meta.url);
  let bytes: Uint8Array;
  try {
    bytes = fs.readFileSync(url);
  } catch {
    throw new Error(`the wasm core ${url.pathname} is missing: run "npm run build:wasm" (npm install runs it)`);
  }
  loaded[which] = new Core(new WebAssembly.Module(bytes as BufferSource));
  return loaded[which];
}

function nodeFs(): { readFileSync(path: URL): Uint8Array } | null {
  const proc = (globalThis as { process?: { getBuiltinModule?: (name: string) => unknown } }).process;
  const mod = proc?.getBuiltinModule?.('node:fs');
  return (mod as { readFileSync(path: URL): Uint8Array } | undefined) ?? null;
}
