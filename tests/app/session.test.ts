// The session and run stores over the real worker API (services on MessageChannels in one
// realm) with an in-memory stand-in for IndexedDB: validation by the library, autosave
// and restore, project and pulse files, links, and a design run from Run to the pulse list.
import { afterAll, describe, expect, it } from 'vitest';
import { parseProject, specHash, type Project } from '../../src/app/project.ts';
import { DesignRun } from '../../src/app/state/design-run.svelte.ts';
import { demoSpec } from '../../src/app/demo.ts';
import { SAVED_HISTORY_CHARS, Session, type SessionStorage } from '../../src/app/state/session.svelte.ts';
import { closePorts, inRealmClient } from '../worker/in-realm.ts';

const client = inRealmClient();
afterAll(() => {
  client.dispose();
  closePorts();
});

/** IndexedDB's part played by a variable; saved objects go through a structured clone as they would. */
function memoryStorage(): SessionStorage & { saved: Project | undefined } {
  return {
    saved: undefined,
    async load() {
      return this.saved === undefined ? undefined : structuredClone(this.saved);
    },
    async save(project: Project) {
      this.saved = structuredClone(project);
    },
  };
}

describe('Session', () => {
  it('opens on the demo, validated by the library', async () => {
    const session = new Session(client, memoryStorage());
    await session.start();
    expect(session.ready).toBe(true);
    expect(session.valid).toBe(true);
    expect(session.problem?.members).toHaveLength(25);
    expect(session.composites.map((c) => c.name)).toContain('bb1');
  });

  it('names the field the library refuses and blocks running; text that does not read blocks it too', async () => {
    const session = new Session(client);
    const run = new DesignRun(session);
    await session.start();
    session.setField('ensemble.detuning.points', 0);
    await session.validate();
    expect(session.specError?.field).toBe('ensemble.detuning.points');
    expect(session.specError?.name).toBe('SpecError');
    expect(run.blocker).toBe(session.specError?.message);
    session.setField('ensemble.detuning.points', 5);
    await session.validate();
    expect(run.blocker).toBeNull();
    session.setFieldError('rabiMax', 'Peak Rabi: "ten" is not a number');
    expect(session.valid).toBe(false);
    expect(run.blocker).toBe('Peak Rabi: "ten" is not a number');
    expect(await run.run()).toBeNull();
    expect(run.status).toBe('idle');
  });

  it('autosaves and comes back: spec, pulses, view and settings', async () => {
    const storage = memoryStorage();
    const first = new Session(client, storage);
    await first.start();
    first.setField('rabiMax', 1.25e7);
    await first.openPulseText('flat.json', JSON.stringify({ dt: 1e-9, i: [1e6, 2e6], q: [0, -1e6] }));
    first.show('robustness');
    await first.saveNow();
    expect(parseProject(storage.saved).spec.rabiMax).toBe(1.25e7);

    const second = new Session(client, storage);
    await second.start();
    expect(second.spec.rabiMax).toBe(1.25e7);
    expect(second.view).toBe('robustness');
    expect(second.pulses).toHaveLength(1);
    expect(Array.from(second.selected!.pulse.q)).toEqual([0, -1e6]);
    expect(second.selected!.pulse.q).toBeInstanceOf(Float64Array);
  });

  it('keeps the spec\'s undo history with the autosave, bounded in size', async () => {
    const storage = memoryStorage();
    const first = new Session(client, storage);
    await first.start();
    first.setField('rabiMax', 1.25e7);
    // A whole spec replaced (as "Apply JSON" with every key does), then reloaded.
    first.replaceSpec({ ...first.spec, duration: 4e-7, rabiMax: 3e7 });
    first.undo();
    await first.saveNow();
    const second = new Session(client, storage);
    await second.start();
    expect(second.spec.rabiMax).toBe(1.25e7);
    expect(second.canRedo).toBe(true);
    second.redo();
    expect(second.spec.rabiMax).toBe(3e7);
    second.undo();
    second.undo();
    expect(second.spec.rabiMax).toBe(demoSpec().rabiMax);
    expect(second.canUndo).toBe(false);

    // 100 steps of a spec carrying a long list: only the newest that fit SAVED_HISTORY_CHARS are kept.
    const big = { ...demoSpec(), notes: 'x'.repeat(SAVED_HISTORY_CHARS / 10) };
    for (let k = 0; k < 30; k++) second.replaceSpec({ ...big, rabiMax: 1e7 + k });
    await second.saveNow();
    const kept = parseProject(storage.saved).specHistory!.past;
    expect(JSON.stringify(kept).length).toBeLessThanOrEqual(SAVED_HISTORY_CHARS);
    expect(kept.length).toBeGreaterThanOrEqual(8);
    expect(kept.at(-1)!.rabiMax).toBe(1e7 + 28);
    // A project file carries no history.
    expect(second.toProject().specHistory).toBeUndefined();
  });

  it('keeps a pulse opened while the saved session is still being restored', async () => {
    const storage = memoryStorage();
    const first = new Session(client, storage);
    await first.start();
    await first.openPulseText('saved.json', JSON.stringify({ dt: 1e-9, i: [1e6], q: [0] }));
    await first.saveNow();
    // A store that answers late, as IndexedDB does on a busy page reading many chunks.
    let release = () => undefined as void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    const slow: SessionStorage = { load: async () => (await gate, storage.load()), save: (p) => storage.save(p) };
    const second = new Session(client, slow);
    const starting = second.start();
    const opening = second.openPulseText('early.json', JSON.stringify({ dt: 1e-9, i: [2e6], q: [0] }));
    await new Promise((resolve) => setTimeout(resolve, 50));
    release();
    await Promise.all([starting, opening]);
    expect(second.pulses.map((p) => p.label)).toEqual(['saved.json', 'early.json']);
    expect(second.selected?.label).toBe('early.json');
  });

  it('lets a link\'s spec win over the autosave', async () => {
    const storage = memoryStorage();
    const first = new Session(client, storage);
    await first.start();
    await first.saveNow();
    const linked = { ...first.spec, rabiMax: 2e7 };
    const second = new Session(client, storage);
    await second.start(specHash(linked));
    expect(second.spec.rabiMax).toBe(2e7);
    expect(second.notice?.text).toMatch(/link/);
  });

  it('refuses a malformed project and a malformed pulse file without changing anything', async () => {
    const session = new Session(client);
    await session.start();
    const before = JSON.stringify(session.spec);
    expect(await session.openProjectText('p.json', '{"format": "gatesmith.project"')).toBe(false);
    expect(session.notice).toEqual({ kind: 'error', text: expect.stringMatching(/^p\.json was not opened: project file: not valid JSON/) });
    const good = session.toProject();
    const broken = { ...good, pulses: [{ id: 'x', label: 'x', dt: 1e-9, i: [1], q: [1], metadata: ['not', 'an', 'object'] }] };
    expect(await session.openProjectText('q.json', JSON.stringify(broken))).toBe(false);
    expect(session.notice?.text).toMatch(/^q\.json was not opened: project file: "pulses\[0\]\.metadata"/);
    expect(await session.openPulseText('r.json', '{"dt": 1e-9, "i": [1, 2], "q": [3]}')).toBe(false);
    expect(session.notice?.text).toMatch(/same length/);
    expect(JSON.stringify(session.spec)).toBe(before);
    expect(session.pulses).toEqual([]);
  });

  it('opens its own project file', async () => {
    const session = new Session(client);
    await session.start();
    session.setField('segments', 120);
    await session.openPulseText('a.json', JSON.stringify({ dt: 2e-9, i: [5e6, 5e6], q: [0, 0] }));
    const text = session.projectFileText();
    const other = new Session(client);
    await other.start();
    expect(await other.openProjectText('saved.json', text)).toBe(true);
    expect(other.spec.segments).toBe(120);
    expect(other.pulses.map((p) => p.label)).toEqual(['a.json']);
    expect(other.valid).toBe(true);
  });
});

describe('DesignRun', () => {
  it('runs the spec, follows the progress and adds the best pulse to the session', async () => {
    const session = new Session(client);
    const run = new DesignRun(session);
    await session.start();
    session.setField('optimizer', { starts: 3, seed: 2, maxIterations: 150 });
    const outcome = await run.run();
    expect(outcome).not.toBeNull();
    expect(run.status).toBe('done');
    expect(run.outcome?.starts.map((s) => s.start)).toEqual([0, 1, 2]);
    expect(run.convergence.series().map((s) => s.start)).toEqual([0, 1, 2]);
    const first = Math.min(...run.convergence.series().map((s) => s.meanInfidelity[0]));
    expect(run.meanInfidelity).toBe(outcome!.evaluation.meanInfidelity);
    expect(run.meanInfidelity!).toBeLessThan(first);
    expect(run.worstInfidelity).toBe(outcome!.evaluation.worstInfidelity);
    expect(session.pulses).toHaveLength(1);
    expect(session.selected?.pulse.metadata.origin).toBe('design');
    expect(session.selected?.pulse.metadata.spec).toEqual(session.spec);
    expect(run.live?.i).toEqual(outcome!.pulse.i);
  });

  it('stops when asked and keeps the best pulse so far', async () => {
    const session = new Session(client);
    const run = new DesignRun(session);
    await session.start();
    session.setField('segments', 1000);
    session.setField('optimizer', { starts: 2, seed: 1, maxIterations: 100000, targetInfidelity: 0 });
    const running = run.run();
    while (run.convergence.received === 0) await new Promise((r) => setTimeout(r, 5));
    await run.stop();
    const outcome = await running;
    expect(outcome?.stopped).toBe(true);
    expect(run.status).toBe('done');
    expect(session.selected?.label).toMatch(/stopped/);
  });
});
