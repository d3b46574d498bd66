// Where a Node worker thread of the library starts. Compiled (dist/core/*.js) a thread loads
// its .js file directly. From the TypeScript sources (tests, benchmarks) it registers tsx
// first: threads do not inherit the parent's loader. tsx is a development tool and never
// loaded by the package.
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';

/** The Worker arguments that run src/core/`name`.ts (or dist/core/`name`.js). */
export function threadEntry(name: string): { url: string | URL; eval: boolean } {
  if (import.meta.url.endsWith('.js')) return { url: new URL(`./${name}.js`, import.meta.url), eval: false };
  // The ESM build of tsx's API (its CommonJS build resolves its loader wrongly from a thread).
  const cjs = createRequire(import.meta.url).resolve('tsx/esm/api');
  const tsx = pathToFileURL(cjs.replace(/index\.cjs$/, 'index.mjs')).href;
  const thread = new URL(`./${name}.ts`, import.meta.url).href;
  return { url: `import(${JSON.stringify(tsx)}).then((m) => { m.register(); return import(${JSON.stringify(thread)}); });`, eval: true };
}
