// Attribution of a page's long main-thread tasks from a Chromium trace (the JSON that
// playwright's browser.startTracing records): for each task over 50 ms on the page's main
// thread, its wall time, the main thread's own CPU time in it (a task stretched by a busy
// machine has little), the events it ran (timer, message, animation frame, GC, layout,
// paint, ...) and the JavaScript functions the sampling profiler saw most in it.

/** Trace categories that give the tasks with their thread (CPU) time and inner events: cheap enough for every run. */
export const TASK_CATEGORIES = ['toplevel', 'devtools.timeline', 'disabled-by-default-devtools.timeline', 'blink.user_timing'];

/** Trace categories that give tasks, their events with thread time, and JS samples. */
export const TRACE_CATEGORIES = [
  'toplevel',
  'devtools.timeline',
  'disabled-by-default-devtools.timeline',
  'v8.execute',
  'disabled-by-default-v8.cpu_profiler',
  'blink.user_timing',
];

interface TraceEvent {
  name: string;
  cat?: string;
  ph: string;
  ts: number;
  dur?: number;
  tdur?: number;
  pid: number;
  tid: number;
  id?: string;
  args?: Record<string, unknown>;
}

/** One long task: where the time went. */
export interface LongTask {
  /** Wall time (ms). */
  wallMs: number;
  /** Main-thread CPU time (ms): far below the wall time when the machine was busy elsewhere. */
  cpuMs: number;
  /** Start, ms from the first task of the trace. */
  atMs: number;
  /** Inner events by name (with a timer's or message's detail), wall ms, largest first. */
  events: Array<[string, number]>;
  /** JavaScript functions (name file:line) by samples taken in the task, ms, largest first. */
  functions: Array<[string, number]>;
}

interface ProfileNode {
  id: number;
  parent?: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
}

/** The renderer main thread of the page: the CrRendererMain thread with the most tasks. */
function mainThread(events: TraceEvent[]): { pid: number; tid: number } | null {
  const mains = new Set(events.filter((e) => e.ph === 'M' && e.name === 'thread_name' && e.args?.name === 'CrRendererMain').map((e) => `${e.pid}:${e.tid}`));
  const counts = new Map<string, number>();
  for (const e of events) {
    const key = `${e.pid}:${e.tid}`;
    if (mains.has(key) && e.ph === 'X' && e.name === 'RunTask') counts.set(key, (counts.get(key) ?? 0) + (e.dur ?? 0));
  }
  const best = [...counts].sort((a, b) => b[1] - a[1])[0];
  if (!best) return null;
  const [pid, tid] = best[0].split(':').map(Number);
  return { pid, tid };
}

function detail(e: TraceEvent): string {
  const data = (e.args?.data ?? {}) as Record<string, unknown>;
  if (e.name === 'FunctionCall' && data.functionName !== undefined) return `FunctionCall ${String(data.functionName) || '(anonymous)'} ${shortUrl(String(data.url ?? ''))}:${data.lineNumber ?? ''}`;
  if (e.name === 'EventDispatch' && data.type) return `EventDispatch ${String(data.type)}`;
  return e.name;
}

function shortUrl(url: string | undefined): string {
  return (url ?? '').replace(/^.*\//, '').replace(/\?.*$/, '');
}

/** Samples of the V8 profiler on the main thread, as [time µs, leaf function]. */
function jsSamples(events: TraceEvent[], pid: number, tid: number): Array<[number, string]> {
  const nodes = new Map<number, ProfileNode>();
  const out: Array<[number, string]> = [];
  const starts = new Map<string, number>();
  for (const e of events) if (e.name === 'Profile' && e.pid === pid && e.tid === tid && e.id) starts.set(e.id, Number((e.args?.data as { startTime?: number })?.startTime ?? e.ts));
  const times = new Map<string, number>();
  for (const e of events) {
    if (e.name !== 'ProfileChunk' || e.pid !== pid || !e.id || !starts.has(e.id)) continue;
    const data = e.args?.data as { cpuProfile?: { nodes?: ProfileNode[]; samples?: number[] }; timeDeltas?: number[] } | undefined;
    for (const n of data?.cpuProfile?.nodes ?? []) nodes.set(n.id, n);
    let t = times.get(e.id) ?? starts.get(e.id)!;
    const samples = data?.cpuProfile?.samples ?? [];
    const deltas = data?.timeDeltas ?? [];
    samples.forEach((id, k) => {
      t += deltas[k] ?? 0;
      out.push([t, String(id)]);
    });
    times.set(e.id, t);
  }
  return out.map(([t, id]) => {
    const node = nodes.get(Number(id));
    const f = node?.callFrame;
    const name = !f ? '?' : `${f.functionName || '(anonymous)'} ${shortUrl(f.url)}:${(f.lineNumber ?? -1) >= 0 ? f.lineNumber + 1 : ''}`;
    return [t, name] as [number, string];
  });
}

const top = (m: Map<string, number>, n: number): Array<[string, number]> =>
  [...m].sort((a, b) => b[1] - a[1]).slice(0, n).map(([k, v]) => [k, Math.round(v * 10) / 10]);

/** The long tasks (over `thresholdMs`) of a trace's page main thread, with what ran in them; with `afterMark`, only those after the page's last performance.mark of that name. */
export function longTasksOfTrace(trace: string | Buffer, thresholdMs = 50, afterMark?: string): LongTask[] {
  const parsed = JSON.parse(String(trace)) as { traceEvents?: TraceEvent[] } | TraceEvent[];
  const events = Array.isArray(parsed) ? parsed : (parsed.traceEvents ?? []);
  const main = mainThread(events);
  if (!main) return [];
  const own = events.filter((e) => e.pid === main.pid && e.tid === main.tid && e.ph === 'X');
  const marks = events.filter((e) => afterMark !== undefined && e.name === afterMark && e.pid === main.pid).map((e) => e.ts);
  const since = marks.length ? Math.max(...marks) : -Infinity;
  const tasks = own.filter((e) => e.name === 'RunTask' && e.ts >= since);
  const first = tasks.reduce((m, e) => Math.min(m, e.ts), Infinity);
  const samples = jsSamples(events, main.pid, main.tid);
  const interval = samples.length > 1 ? Math.max(0.1, (samples.at(-1)![0] - samples[0][0]) / (samples.length - 1) / 1000) : 0.1;
  const out: LongTask[] = [];
  for (const task of tasks) {
    const wall = (task.dur ?? 0) / 1000;
    if (wall <= thresholdMs) continue;
    const end = task.ts + (task.dur ?? 0);
    const inner = new Map<string, number>();
    for (const e of own) {
      if (e === task || e.ts < task.ts || e.ts >= end || e.name === 'RunTask') continue;
      const key = detail(e);
      inner.set(key, (inner.get(key) ?? 0) + (e.dur ?? 0) / 1000);
    }
    const fns = new Map<string, number>();
    // A sample's time is taken at its end: about `interval` of work before it.
    for (const [t, name] of samples) if (t >= task.ts && t < end && name !== '(program) :' && name !== '(idle) :') fns.set(name, (fns.get(name) ?? 0) + interval);
    out.push({ wallMs: wall, cpuMs: (task.tdur ?? task.dur ?? 0) / 1000, atMs: (task.ts - first) / 1000, events: top(inner, 8), functions: top(fns, 8) });
  }
  return out;
}
