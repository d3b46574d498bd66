// A ladder map's leakage as a map of its own, so that the heatmap draws it on the same axes
// and grid as the infidelity (coarse first, NaN where the full resolution is still to come).
import type { MapUpdate } from '../../worker/client.ts';
import type { MapResult } from '../../worker/protocol.ts';

/** The leakage of a map update in the heatmap's `infidelity` slot, or null when the map has none (two levels). */
export function leakageUpdate(update: MapUpdate | null): MapUpdate | null {
  if (!update?.coarse.leakage) return null;
  const swap = (m: MapResult): MapResult => ({ detuning: m.detuning, amplitudeError: m.amplitudeError, infidelity: m.leakage ?? new Float64Array(m.infidelity.length).fill(NaN) });
  return { coarse: swap(update.coarse), ...(update.fine ? { fine: swap(update.fine) } : {}), complete: update.complete };
}
