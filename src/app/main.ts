// The page's entry: the worker pool, the session (restored from the link or the autosave)
// and the components.
import { mount } from 'svelte';
import { createBrowserClient } from '../worker/client.ts';
import App from './App.svelte';
import './app.css';
import { DesignRun } from './state/design-run.svelte.ts';
import { Session } from './state/session.svelte.ts';
import { indexedDbStorage } from './storage.ts';

const session = new Session(createBrowserClient(), indexedDbStorage);
const run = new DesignRun(session);
mount(App, { target: document.getElementById('app')!, props: { session, run } });
void session.start(location.hash);
// A link pasted into the address bar of this tab changes only the hash: no new page load.
addEventListener('hashchange', () => session.openLink(location.hash));
addEventListener('pagehide', () => void session.saveNow());
