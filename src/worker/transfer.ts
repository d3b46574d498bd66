// Moving results out of the worker: typed arrays are copied once (so that nothing the
// library still holds, such as a view of wasm memory, is detached) and their buffers
// transferred instead of cloned.
import { transfer } from 'comlink';

type SampleArray = Float64Array | Float32Array | Int32Array | Int16Array | Uint8Array;

/** The typed arrays both walks copy and transfer (samples, maps, indices, masks). */
function isSampleArray(value: object): value is SampleArray {
  return value instanceof Float64Array || value instanceof Float32Array || value instanceof Int32Array || value instanceof Int16Array || value instanceof Uint8Array;
}

function copyDeep(value: unknown, memo: Map<unknown, unknown>, buffers: ArrayBuffer[]): unknown {
  if (typeof value !== 'object' || value === null) return value;
  const seen = memo.get(value);
  if (seen !== undefined) return seen;
  if (isSampleArray(value)) {
    const copy = value.slice();
    buffers.push(copy.buffer as ArrayBuffer);
    memo.set(value, copy);
    return copy;
  }
  if (Array.isArray(value)) {
    const out: unknown[] = [];
    memo.set(value, out);
    for (const item of value) out.push(copyDeep(item, memo, buffers));
    return out;
  }
  if (Object.getPrototypeOf(value) === Object.prototype) {
    const out: Record<string, unknown> = {};
    memo.set(value, out);
    for (const [key, item] of Object.entries(value)) out[key] = copyDeep(item, memo, buffers);
    return out;
  }
  return value;
}

/** A copy of `value` whose typed arrays are fresh, with their buffers listed for transfer. */
export function detached<T>(value: T): { value: T; buffers: ArrayBuffer[] } {
  const buffers: ArrayBuffer[] = [];
  const copy = copyDeep(value, new Map(), buffers) as T;
  return { value: copy, buffers };
}

/** Marks a result so that comlink moves its typed arrays' buffers rather than cloning them. */
export function moved<T>(value: T): T {
  const { value: copy, buffers } = detached(value);
  return transfer(copy, buffers);
}

/** Elements copied at once when a large typed array is copied to be sent (2 MB of doubles); the page runs between slices. */
export const COPY_SLICE = 1 << 18;

/** Lets the page run (input, drawing) before the next slice of work. */
const yieldToPage = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

async function copyInSlices<A extends SampleArray>(value: A): Promise<A> {
  if (value.length <= COPY_SLICE) return value.slice() as A;
  const copy = new (value.constructor as new (n: number) => A)(value.length);
  for (let from = 0; from < value.length; from += COPY_SLICE) {
    if (from > 0) await yieldToPage();
    copy.set(value.subarray(from, from + COPY_SLICE) as never, from);
  }
  return copy;
}

async function copyDeepInSlices(value: unknown, memo: Map<unknown, unknown>, buffers: ArrayBuffer[]): Promise<unknown> {
  if (typeof value !== 'object' || value === null) return value;
  if (memo.has(value)) return memo.get(value);
  if (isSampleArray(value)) {
    const copy = await copyInSlices(value);
    buffers.push(copy.buffer as ArrayBuffer);
    memo.set(value, copy);
    return copy;
  }
  if (Array.isArray(value)) {
    const out: unknown[] = [];
    memo.set(value, out);
    for (const item of value) out.push(await copyDeepInSlices(item, memo, buffers));
    return out;
  }
  if (Object.getPrototypeOf(value) === Object.prototype) {
    const out: Record<string, unknown> = {};
    memo.set(value, out);
    for (const [key, item] of Object.entries(value)) out[key] = await copyDeepInSlices(item, memo, buffers);
    return out;
  }
  return value;
}

/**
 * An argument for a worker call: a copy whose typed arrays (a pulse's samples) are made in
 * slices that let the page run between them, and whose buffers comlink transfers instead of
 * cloning. The caller's arrays stay whole: the page keeps drawing the pulse it sent. Cloning
 * two arrays of 1.5 million samples held the page for about 100 ms in one task.
 */
export async function sendable<T>(value: T): Promise<T> {
  const buffers: ArrayBuffer[] = [];
  const copy = (await copyDeepInSlices(value, new Map(), buffers)) as T;
  return buffers.length && typeof copy === 'object' && copy !== null ? transfer(copy, buffers) : copy;
}
