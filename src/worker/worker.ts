// The Web Worker: loads the wasm core (and its fused build, where the browser runs relaxed
// SIMD) from the page's own origin and exposes the service.
// The only `expose` in the project; the page reaches it through client.ts.
import { expose } from 'comlink';
import wasmUrl from '../../build/gatesmith.wasm?url';
import fusedUrl from '../../build/gatesmith-fused.wasm?url';
import { initCore } from '../core/api.ts';
import { library } from './library.ts';
import { createCoreService } from './service.ts';

expose(createCoreService(library, { load: () => initCore(new URL(wasmUrl, self.location.href).href, new URL(fusedUrl, self.location.href).href) }));
