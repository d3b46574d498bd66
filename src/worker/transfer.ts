// Moving results out of the worker: typed arrays are copied once (so that nothing the
// library still holds, such as a view of wasm memory, is detached) and their buffers
// transferred instead of cloned.
import { transfer } from 'comlink';

function copyDeep(value: unknown, memo: Map<unknown, unknown>, buffers: ArrayBuffer[]): unknown {
  if (typeof value !== 'object' || value === null) return value;
  const seen = memo.get(value);
  if (seen !== undefined) return seen;
  if (value instanceof Float64Array || value instanceof Float32Array || value instanceof Uint8Array || value instanceof Int16Array) {
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
