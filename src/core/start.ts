// Deterministic starting points of the optimiser: a smooth random pulse per start,
// drawn from a seeded generator so that the same seed gives the same design.
import type { Problem } from './types.ts';
import * as pm from './portable-math.ts';

/** mulberry32: a small, fast 32-bit generator (public domain, common practice). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Mix seed and start index into one 32-bit generator seed. */
function startSeed(seed: number, start: number): number {
  let h = Math.imul((seed | 0) ^ 0x9e3779b9, 0x85ebca6b) ^ Math.imul(start + 1, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

const MODES = 4;
const SPREAD = 0.6;

/**
 * Optimiser variables (interleaved x, y per free sample) of a smooth random pulse:
 * a few low Fourier modes per quadrature, of size SPREAD in variable units (about
 * half the peak Rabi frequency after the bounded map).
 */
export function initialVariables(problem: Problem, start: number, nVar: number): Float64Array {
  const rand = mulberry32(startSeed(problem.optimizer.seed, start));
  const free = nVar / 2;
  const x = new Float64Array(nVar);
  for (let channel = 0; channel < 2; channel++) {
    const offset = (rand() * 2 - 1) * SPREAD;
    const amp: number[] = [];
    const phase: number[] = [];
    for (let k = 0; k < MODES; k++) {
      amp.push(((rand() * 2 - 1) * SPREAD) / (k + 1));
      phase.push(rand() * 2 * Math.PI);
    }
    for (let f = 0; f < free; f++) {
      const t = (f + 0.5) / free;
      let v = offset;
      for (let k = 0; k < MODES; k++) v += amp[k] * pm.sin(Math.PI * (k + 1) * t + phase[k]);
      x[2 * f + channel] = v;
    }
  }
  return x;
}

/** The largest |sample| / rabiMax of the disc a given start may have: the inverse of tanh is finite and its slope not vanishing there. */
const SEED_CAP = 0.98;

/**
 * Optimiser variables that stand for the given samples (the inverse of the bound's map,
 * assembly/control.ts): for the disc, (I, Q) = rabiMax tanh(r)/r (x, y) inverted with each
 * sample pulled inside SEED_CAP of the bound; for the box, the samples over rabiMax, clamped to it.
 */
export function variablesFromSamples(problem: Problem, samples: { i: ArrayLike<number>; q: ArrayLike<number> }, nVar: number): Float64Array {
  const { rabiMax, constraints } = problem;
  const first = constraints.zeroEdges && problem.segments >= 3 ? 1 : 0;
  const x = new Float64Array(nVar);
  for (let f = 0; f < nVar / 2; f++) {
    const iv = samples.i[first + f] / rabiMax, qv = samples.q[first + f] / rabiMax;
    if (constraints.bound === 'box') {
      x[2 * f] = Math.max(-1, Math.min(1, iv));
      x[2 * f + 1] = Math.max(-1, Math.min(1, qv));
      continue;
    }
    const a = Math.hypot(iv, qv);
    // r = atanh(|(I, Q)| / rabiMax) along the same direction.
    const ratio = a < 1e-8 ? 1 : pm.atanh(Math.min(a, SEED_CAP)) / a;
    x[2 * f] = iv * ratio;
    x[2 * f + 1] = qv * ratio;
  }
  return x;
}
