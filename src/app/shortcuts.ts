// Keyboard shortcuts of the page: one table, used both to act on keys and to list them.
import { VIEWS, type ViewId } from './state/session.svelte.ts';

/** What a shortcut does. */
export type Action = { kind: 'run' } | { kind: 'stop' } | { kind: 'view'; view: ViewId } | { kind: 'save' } | { kind: 'open' } | { kind: 'undo' } | { kind: 'redo' } | { kind: 'docs' };

/** A shortcut as listed on the page. */
export interface Shortcut {
  keys: string;
  what: string;
}

/** The shortcuts, for the list on the page. */
export const SHORTCUTS: Shortcut[] = [
  { keys: 'Ctrl+Enter', what: 'run' },
  { keys: 'Esc', what: 'stop' },
  { keys: `Alt+1 … Alt+${VIEWS.length}`, what: VIEWS.map((v) => v.title.toLowerCase()).join(', ') },
  { keys: 'Ctrl+S', what: 'save project' },
  { keys: 'Ctrl+O', what: 'open project' },
  { keys: 'Ctrl+Z / Ctrl+Shift+Z', what: 'undo / redo a spec edit' },
  { keys: 'F1', what: 'documentation (at the field in focus)' },
];

/** The action of a key press, or null (Cmd counts as Ctrl on a Mac). */
export function actionFor(event: Pick<KeyboardEvent, 'key' | 'code' | 'ctrlKey' | 'metaKey' | 'altKey' | 'shiftKey'>): Action | null {
  const ctrl = event.ctrlKey || event.metaKey;
  if (ctrl && event.key === 'Enter') return { kind: 'run' };
  if (event.key === 'Escape') return { kind: 'stop' };
  if (event.key === 'F1') return { kind: 'docs' };
  if (ctrl && !event.altKey && event.key.toLowerCase() === 's') return { kind: 'save' };
  if (ctrl && !event.altKey && event.key.toLowerCase() === 'o') return { kind: 'open' };
  if (ctrl && !event.altKey && event.key.toLowerCase() === 'z') return { kind: event.shiftKey ? 'redo' : 'undo' };
  if (ctrl && !event.altKey && event.key.toLowerCase() === 'y') return { kind: 'redo' };
  if (event.altKey && !ctrl) {
    // event.code keeps the digit whatever the keyboard layout makes of Alt+digit.
    const digit = /^Digit([1-9])$/.exec(event.code)?.[1] ?? (/^[1-9]$/.test(event.key) ? event.key : null);
    if (digit) {
      const view = VIEWS[Number(digit) - 1];
      if (view) return { kind: 'view', view: view.id };
    }
  }
  return null;
}
