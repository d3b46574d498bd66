// The Web Worker: loads the wasm core from the page's own origin and exposes the service.
// The only `expose` in the project; the page reaches it through client.ts.
import { expose } from 'comlink';
import wasmUrl from '../../build/gatesmith.wasm?url';
import { initCore } from '../core/api.ts';
import { library } from './library.ts';
import { createCoreService } from './service.ts';

expose(createCoreService(library, { load: () => initCore(new URL(wasmUrl, self.location.href).href) }));
