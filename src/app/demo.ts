// The demo scenarios the page opens on: the project's own example specs (invented labs).
import transmon from '../../examples/transmon-x90.json';
import ion from '../../examples/ion-x180.json';

/** A named demo spec. */
export interface Demo {
  id: string;
  title: string;
  spec: Record<string, unknown>;
}

/** The demos offered on the page; the first is loaded on a first visit. */
export const DEMOS: readonly Demo[] = [
  { id: 'transmon-x90', title: 'Transmon, robust X(90)', spec: transmon },
  { id: 'ion-x180', title: 'Trapped ion, robust X(180)', spec: ion },
];

/** A fresh copy of a demo's spec (callers may edit it). */
export function demoSpec(id = DEMOS[0].id): Record<string, unknown> {
  const demo = DEMOS.find((d) => d.id === id) ?? DEMOS[0];
  return structuredClone(demo.spec);
}
