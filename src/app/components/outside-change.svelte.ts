// Fields keep the text the user typed; when their value is replaced from outside (a demo,
// a project, a link) the text must follow. This is the one place that watches for that.
import { untrack } from 'svelte';

const byJson = (a: unknown, b: unknown): boolean => JSON.stringify(a) === JSON.stringify(b);

/**
 * Calls `update(value)` outside tracking whenever `read()` gives a value that differs from
 * the last one seen (by JSON, or by `equal`). Call it during component initialisation.
 */
export function onOutsideChange<T>(read: () => T, update: (value: T) => void, equal: (a: T, b: T) => boolean = byJson): void {
  let seen = untrack(read);
  $effect(() => {
    const v = read();
    if (equal(v, seen)) return;
    seen = v;
    untrack(() => update(v));
  });
}
