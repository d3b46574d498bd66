// The autosave's store over a stand-in for IndexedDB (a Map; values go through a structured
// clone as IndexedDB's do): samples in chunks of their own, written once per pulse, read
// back bit for bit, and deleted with their pulse. Invariants of the store, no timing.
import { describe, expect, it } from 'vitest';
import { PROJECT_FORMAT, PROJECT_VERSION, defaultSettings, type Project, type StoredPulse } from '../../src/app/project.ts';
import { chunkedStorage, SAMPLES_PER_CHUNK, SAMPLES_PREFIX, SESSION_KEY, type KeyValueStore } from '../../src/app/storage.ts';

function memoryStore(): KeyValueStore & { data: Map<string, unknown>; writes: string[] } {
  const data = new Map<string, unknown>();
  const writes: string[] = [];
  return {
    data,
    writes,
    get: async (key) => structuredClone(data.get(key)),
    set: async (key, value) => {
      writes.push(key);
      data.set(key, structuredClone(value));
    },
    del: async (key) => void data.delete(key),
    keys: async () => [...data.keys()],
  };
}

function pulse(id: string, n: number): StoredPulse {
  const i = new Float64Array(n).map((_, k) => Math.sin(k / 97) * 1e7);
  const q = new Float64Array(n).map((_, k) => Math.cos(k / 89) * 1e7 + k * 1e-3);
  return { id, label: id, dt: 2e-9, i, q, metadata: { origin: 'design' } };
}

function project(pulses: StoredPulse[]): Project {
  return { format: PROJECT_FORMAT, version: PROJECT_VERSION, savedAt: '', spec: { duration: 2e-4 }, pulses, settings: defaultSettings() };
}

const sampleKeys = (store: { data: Map<string, unknown> }) => [...store.data.keys()].filter((k) => k.startsWith(SAMPLES_PREFIX));

describe('the autosave store', () => {
  it('keeps 100 000 samples in chunks outside the session record and reads them back bit for bit', async () => {
    const store = memoryStore();
    const storage = chunkedStorage(store);
    const big = pulse('design-a', 100_000);
    await storage.save(project([big, pulse('file-b', 10)]));
    // ceil(100 000 / 32 768) = 4 chunks, and 1 for the small pulse.
    expect(sampleKeys(store)).toHaveLength(Math.ceil(100_000 / SAMPLES_PER_CHUNK) + 1);
    for (const key of sampleKeys(store)) expect((store.data.get(key) as { i: Float64Array }).i.length).toBeLessThanOrEqual(SAMPLES_PER_CHUNK);
    // The record itself holds no samples.
    const record = store.data.get(SESSION_KEY) as { pulses: Record<string, unknown>[] };
    expect(record.pulses.every((p) => !('i' in p) && !('q' in p))).toBe(true);

    const loaded = (await chunkedStorage(store).load()) as Project;
    const back = loaded.pulses[0];
    expect(back.i).toBeInstanceOf(Float64Array);
    expect(Array.from(back.i)).toEqual(Array.from(big.i));
    expect(Array.from(back.q)).toEqual(Array.from(big.q));
    expect(loaded.pulses[1].i).toHaveLength(10);
  });

  it('writes a pulse\'s samples once: later autosaves write the record only', async () => {
    const store = memoryStore();
    const storage = chunkedStorage(store);
    const pulses = [pulse('design-a', 70_000)];
    await storage.save(project(pulses));
    store.writes.length = 0;
    await storage.save(project(pulses));
    expect(store.writes).toEqual([SESSION_KEY]);
    // Samples read back count as written too.
    const again = chunkedStorage(store);
    const loaded = (await again.load()) as Project;
    store.writes.length = 0;
    await again.save(loaded);
    expect(store.writes).toEqual([SESSION_KEY]);
  });

  it('deletes the samples of a pulse that is gone, and writes them again if it comes back', async () => {
    const store = memoryStore();
    const storage = chunkedStorage(store);
    const a = pulse('design-a', 40_000);
    const b = pulse('file-b', 5);
    await storage.save(project([a, b]));
    await storage.save(project([b]));
    expect(sampleKeys(store).every((k) => k.startsWith(`${SAMPLES_PREFIX}file-b/`))).toBe(true);
    // Undo of a removal: the same arrays again.
    await storage.save(project([a, b]));
    const loaded = (await chunkedStorage(store).load()) as Project;
    expect(Array.from(loaded.pulses[0].i)).toEqual(Array.from(a.i));
  });

  it('reads a record saved with the samples inside it, and says which chunk is missing', async () => {
    const store = memoryStore();
    const old = project([pulse('design-a', 3)]);
    store.data.set(SESSION_KEY, old);
    const loaded = (await chunkedStorage(store).load()) as Project;
    expect(Array.from(loaded.pulses[0].i)).toEqual(Array.from(old.pulses[0].i));

    const storage = chunkedStorage(store);
    await storage.save(project([pulse('design-c', 40_000)]));
    store.data.delete(`${SAMPLES_PREFIX}design-c/40000/1`);
    await expect(chunkedStorage(store).load()).rejects.toThrow(/design-c\/40000\/1/);
  });
});
