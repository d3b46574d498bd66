// The autosaved session in the browser's IndexedDB (idb-keyval), under one key.
import { get, set } from 'idb-keyval';
import type { Project } from './project.ts';
import type { SessionStorage } from './state/session.svelte.ts';

/** The IndexedDB key of the autosaved session. */
export const SESSION_KEY = 'gatesmith.session';

/** The session kept in IndexedDB. */
export const indexedDbStorage: SessionStorage = {
  load: () => get(SESSION_KEY),
  save: (project: Project) => set(SESSION_KEY, project),
};
