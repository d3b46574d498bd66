// Keyboard shortcuts: the keys listed on the page do what the list says.
import { describe, expect, it } from 'vitest';
import { actionFor, SHORTCUTS } from '../../src/app/shortcuts.ts';
import { VIEWS } from '../../src/app/state/session.svelte.ts';

const key = (k: string, mods: Partial<{ ctrlKey: boolean; metaKey: boolean; altKey: boolean; shiftKey: boolean; code: string }> = {}) => ({
  key: k,
  code: mods.code ?? '',
  ctrlKey: false,
  metaKey: false,
  altKey: false,
  shiftKey: false,
  ...mods,
});

describe('shortcuts', () => {
  it('run, stop, save and open', () => {
    expect(actionFor(key('Enter', { ctrlKey: true }))).toEqual({ kind: 'run' });
    expect(actionFor(key('Enter', { metaKey: true }))).toEqual({ kind: 'run' });
    expect(actionFor(key('Escape'))).toEqual({ kind: 'stop' });
    expect(actionFor(key('F1'))).toEqual({ kind: 'docs' });
    expect(actionFor(key('s', { ctrlKey: true }))).toEqual({ kind: 'save' });
    expect(actionFor(key('o', { ctrlKey: true }))).toEqual({ kind: 'open' });
    expect(actionFor(key('Enter'))).toBeNull();
    expect(actionFor(key('s'))).toBeNull();
  });
  it('switch to each view with Alt and its number, whatever character the layout gives', () => {
    VIEWS.forEach((view, k) => {
      expect(actionFor(key('¡', { altKey: true, code: `Digit${k + 1}` }))).toEqual({ kind: 'view', view: view.id });
    });
    expect(actionFor(key('9', { altKey: true, code: 'Digit9' }))).toBeNull();
  });
  it('are all listed on the page', () => {
    const listed = SHORTCUTS.map((s) => s.keys).join(' ');
    for (const keys of ['Ctrl+Enter', 'Esc', 'Alt+1', `Alt+${VIEWS.length}`, 'Ctrl+S', 'Ctrl+O', 'F1']) expect(listed).toContain(keys);
    expect(SHORTCUTS.find((s) => s.keys.startsWith('Alt'))?.what).toContain('robustness');
  });
});
