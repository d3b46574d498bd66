// Timing helpers the benchmark files share: medians, never means (a busy machine adds outliers).

/** The median of some values (the upper one of an even count). */
export function medianOf(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** The median time (ms) of `reps` calls of `fn`. */
export function timeMedian(fn: () => void, reps: number): number {
  const t: number[] = [];
  for (let k = 0; k < reps; k++) {
    const a = performance.now();
    fn();
    t.push(performance.now() - a);
  }
  return medianOf(t);
}
