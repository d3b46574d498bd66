// The autosaved session in the browser's IndexedDB (idb-keyval). The session record holds
// the spec, the settings and each pulse's fields except its samples; the samples live under
// keys of their own, in chunks, written once per pulse and one chunk per transaction, so
// that no single write holds the page (a whole 100 000-sample pulse in one value took
// 50-300 ms of the main thread to write, on every autosave). Samples no pulse refers to any
// more are deleted after the record is written.
import { del, get, keys, set } from 'idb-keyval';
import type { Project, StoredPulse } from './project.ts';
import type { SessionStorage } from './state/session.svelte.ts';

/** The IndexedDB key of the autosaved session. */
export const SESSION_KEY = 'gatesmith.session';
/** Keys of sample chunks begin with this. */
export const SAMPLES_PREFIX = 'gatesmith.samples/';
/** Samples (of I and of Q each) per stored chunk: 256 kB a channel, about a millisecond to write. */
export const SAMPLES_PER_CHUNK = 32_768;

/** The part of IndexedDB the store uses (idb-keyval's functions, or a stand-in in tests). */
export interface KeyValueStore {
  get(key: string): Promise<unknown>;
  set(key: string, value: unknown): Promise<void>;
  del(key: string): Promise<void>;
  keys(): Promise<string[]>;
}

/** Where a pulse's samples are, in the session record (instead of `i` and `q`). */
interface SamplesRef {
  key: string;
  length: number;
  chunks: number;
}

type RecordPulse = Omit<StoredPulse, 'i' | 'q'> & { i?: StoredPulse['i']; q?: StoredPulse['q']; samples?: SamplesRef };

const chunkKey = (ref: SamplesRef, k: number) => `${ref.key}/${k}`;

/** A session store over a key-value store: the record, and each pulse's samples in chunks. */
export function chunkedStorage(store: KeyValueStore): SessionStorage {
  /** Samples already in the store, by key: the very arrays written (a pulse's samples never change). */
  const written = new Map<string, Float64Array>();
  let queue: Promise<void> = Promise.resolve();

  const refOf = (p: StoredPulse): SamplesRef => ({ key: `${SAMPLES_PREFIX}${p.id}/${p.i.length}`, length: p.i.length, chunks: Math.ceil(p.i.length / SAMPLES_PER_CHUNK) });

  async function writeSamples(ref: SamplesRef, i: Float64Array, q: Float64Array): Promise<void> {
    if (written.get(ref.key) === i) return;
    for (let k = 0; k < ref.chunks; k++) {
      const from = k * SAMPLES_PER_CHUNK;
      const to = Math.min(ref.length, from + SAMPLES_PER_CHUNK);
      // One chunk per transaction: the page runs between them.
      await store.set(chunkKey(ref, k), { i: i.slice(from, to), q: q.slice(from, to) });
    }
    written.set(ref.key, i);
  }

  async function save(project: Project): Promise<void> {
    const pulses: RecordPulse[] = [];
    for (const p of project.pulses) {
      if (!(p.i instanceof Float64Array) || !(p.q instanceof Float64Array)) {
        pulses.push(p);
        continue;
      }
      const { i, q, ...rest } = p;
      const samples = refOf(p);
      await writeSamples(samples, i, q);
      pulses.push({ ...rest, samples });
    }
    await store.set(SESSION_KEY, { ...project, pulses });
    // Samples of pulses the record no longer holds (removed, or replaced by a project).
    const kept = new Set(pulses.flatMap((p) => (p.samples ? [p.samples.key] : [])));
    for (const key of await store.keys()) {
      if (!key.startsWith(SAMPLES_PREFIX)) continue;
      const base = key.slice(0, key.lastIndexOf('/'));
      if (kept.has(base)) continue;
      await store.del(key);
      written.delete(base);
    }
  }

  async function readSamples(ref: SamplesRef): Promise<{ i: Float64Array; q: Float64Array }> {
    const i = new Float64Array(ref.length);
    const q = new Float64Array(ref.length);
    for (let k = 0; k < ref.chunks; k++) {
      const chunk = (await store.get(chunkKey(ref, k))) as { i?: unknown; q?: unknown } | undefined;
      const from = k * SAMPLES_PER_CHUNK;
      const size = Math.min(ref.length, from + SAMPLES_PER_CHUNK) - from;
      if (!(chunk?.i instanceof Float64Array) || !(chunk.q instanceof Float64Array) || chunk.i.length !== size || chunk.q.length !== size) {
        throw new Error(`the samples of a saved pulse are missing or damaged (${chunkKey(ref, k)})`);
      }
      i.set(chunk.i, from);
      q.set(chunk.q, from);
    }
    written.set(ref.key, i);
    return { i, q };
  }

  return {
    async load(): Promise<unknown> {
      const saved = (await store.get(SESSION_KEY)) as { pulses?: unknown } | undefined;
      if (!saved || typeof saved !== 'object' || !Array.isArray(saved.pulses)) return saved;
      const pulses = [];
      for (const p of saved.pulses as RecordPulse[]) {
        const ref = p?.samples;
        if (!ref || typeof ref.key !== 'string' || !Number.isInteger(ref.length) || !Number.isInteger(ref.chunks)) {
          pulses.push(p);
          continue;
        }
        const { samples: _samples, ...rest } = p;
        pulses.push({ ...rest, ...(await readSamples(ref)) });
      }
      return { ...saved, pulses };
    },
    save(project: Project): Promise<void> {
      // Saves run one after another: a later one never writes its record before an earlier one.
      const next = queue.then(() => save(project));
      queue = next.catch(() => undefined);
      return next;
    },
  };
}

/** The session kept in IndexedDB. */
export const indexedDbStorage: SessionStorage = chunkedStorage({
  get: (key) => get(key),
  set: (key, value) => set(key, value),
  del: (key) => del(key),
  keys: () => keys<string>(),
});
