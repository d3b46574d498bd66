// Published composite pulses and shaped single pulses (docs/physics.md section 4), built as
// ordinary pulses under a peak Rabi frequency and a sample period, so that a designed
// pulse can be compared with what a lab already uses. Each element is a rectangular
// rotation; its duration is rounded up to whole samples and its amplitude lowered so
// that its angle stays exact.
import { ArgumentError, SpecError, describeValue } from './errors.ts';
import type { Pulse, PulseMetadata, Target } from './types.ts';

/** The sequences buildComposite knows, by name. */
export type CompositeName =
  | 'rectangular'
  | 'bb1'
  | 'sk1'
  | 'corpse'
  | 'short-corpse'
  | 'scrofulous'
  | 'knill'
  | '90-180-90'
  | 'gaussian'
  | 'raised-cosine';

/** Where BB1's correction block sits relative to the main rotation theta_0. */
export type Bb1Placement = 'after' | 'before' | 'middle';

/** One element of a sequence: a rotation by `angle` about (cos phase, sin phase, 0), radians. */
export interface CompositeElement {
  angle: number;
  phase: number;
}

/** A catalogue entry: what a sequence is for and where it was published. */
export interface CompositeInfo {
  name: CompositeName;
  title: string;
  corrects: string;
  source: string;
  /** The target angles the sequence is defined for, in words. */
  angles: string;
}

/** Options of buildComposite. Angles in degrees, rabiMax in Hz, dt in seconds. */
export interface CompositeOptions {
  angleDeg: number;
  /** Phase of the target rotation axis in the xy-plane (default 0, the x axis). */
  axisDeg?: number;
  rabiMax: number;
  dt: number;
  /** BB1 only: where the correction block goes (default 'after', the order of docs/physics.md section 4). */
  placement?: Bb1Placement;
  /** Gaussian only: the envelope is cut at +-sigmas standard deviations (default 3). */
  sigmas?: number;
}

/** One element as built: angle and phase (degrees), its samples and its Rabi frequency (Hz). */
export interface BuiltElement {
  angleDeg: number;
  phaseDeg: number;
  /** Index of the element's first sample in the pulse. */
  firstSample: number;
  samples: number;
  /** Amplitude of the element (its peak, for a shaped pulse), Hz. */
  rabiHz: number;
}

/** Metadata of a composite pulse: the sequence, its source, its elements and its ideal operation. */
export interface CompositeMetadata extends PulseMetadata {
  origin: 'composite';
  name: string;
  composite: CompositeName;
  source: string;
  corrects: string;
  angleDeg: number;
  axisDeg: number;
  rabiMax: number;
  placement?: Bb1Placement;
  sigmas?: number;
  elements: BuiltElement[];
  /** The operation to compare the pulse with (Knill: its own pi rotation; 90-180-90: an inversion). */
  ideal: Target;
  /** How element durations were fitted to whole samples. */
  rounding: string;
  /**
   * (max - min)/max of the element amplitudes. Rounding can leave elements at different
   * Rabi rates; a first-order detuning correction (CORPSE, Knill) is then left with a
   * first-order residue proportional to this spread (amplitude-error corrections are not affected).
   */
  elementRabiSpread: number;
}

const DEG = Math.PI / 180;
// A ceiling on the pulse length, so that a mistyped dt fails clearly instead of filling memory.
const MAX_SAMPLES = 10_000_000;

// The first minimum of sin(t)/t (at t = tan t = 4.4934...) bounds SCROFULOUS: its
// equation sin(t1)/t1 = 2 cos(theta/2)/pi has a solution only while the right side
// stays above this value, i.e. for theta up to about 219.9 degrees.
const SINC_FIRST_MINIMUM_AT = 4.493409457909064;
const SCROFULOUS_MIN_DEG = 0.01;
const SCROFULOUS_MAX_DEG =
  (2 * Math.acos((Math.PI / 2) * (Math.sin(SINC_FIRST_MINIMUM_AT) / SINC_FIRST_MINIMUM_AT))) / DEG;

interface Definition extends CompositeInfo {
  /** Whether the sequence is defined for this target angle (radians). */
  allows(angleRad: number): boolean;
  elements(angleRad: number, placement: Bb1Placement): CompositeElement[];
  /** The operation the sequence performs without error, for a target about the x axis. */
  ideal(angleRad: number): Target;
  shaped?: 'gaussian' | 'raised-cosine';
}

const xGate = (angleRad: number): Target => ({ kind: 'gate', axis: [1, 0, 0], angleRad });
const positive = (limitRad: number) => (angleRad: number) => angleRad > 0 && angleRad <= limitRad * (1 + 1e-12);
const isPi = (angleRad: number) => Math.abs(angleRad - Math.PI) <= 1e-9;
const CUMMINS = 'Cummins, Llewellyn, Jones, Phys. Rev. A 67, 042308 (2003)';

/** The BB1 / SK1 phase p1 = arccos(-theta / (4 pi)). */
function wimperisPhase(angleRad: number): number {
  return Math.acos(Math.max(-1, -angleRad / (4 * Math.PI)));
}

/** CORPSE's k = arcsin(sin(theta/2) / 2). */
function corpseK(angleRad: number): number {
  return Math.asin(Math.sin(angleRad / 2) / 2);
}

/** SCROFULOUS's t1, p1, p2 for a target angle within its range. */
function scrofulousAngles(angleRad: number): { t1: number; p1: number; p2: number } {
  // sin(t)/t falls monotonically from 2/pi at t = pi/2 to its minimum, so bisection on
  // that branch finds the one solution; 200 halvings reach the last bit.
  const rhs = (2 * Math.cos(angleRad / 2)) / Math.PI;
  let lo = Math.PI / 2;
  let hi = SINC_FIRST_MINIMUM_AT;
  for (let step = 0; step < 200 && hi - lo > 0; step++) {
    const mid = (lo + hi) / 2;
    if (Math.sin(mid) / mid > rhs) lo = mid;
    else hi = mid;
  }
  const t1 = (lo + hi) / 2;
  const clamp = (x: number) => Math.max(-1, Math.min(1, x));
  const p1 = Math.acos(clamp((-Math.PI * Math.cos(t1)) / (2 * t1 * Math.sin(angleRad / 2))));
  const p2 = p1 - Math.acos(clamp(-Math.PI / (2 * t1)));
  return { t1, p1, p2 };
}

/** A single rotation, rectangular or shaped: the everyday baselines. */
function singlePulse(name: CompositeName, title: string, corrects: string, shaped?: Definition['shaped']): Definition {
  return {
    name,
    title,
    corrects,
    source: 'common practice',
    angles: 'any angle > 0',
    allows: (a) => a > 0,
    elements: (a) => [{ angle: a, phase: 0 }],
    ideal: xGate,
    ...(shaped ? { shaped } : {}),
  };
}

/** CORPSE and short CORPSE, which differ only by a full turn in their first element. */
function corpseFamily(name: CompositeName, title: string, firstExtra: number): Definition {
  return {
    name,
    title,
    corrects: 'detuning, to first order',
    source: CUMMINS,
    angles: 'angles in (0, 360] degrees',
    allows: positive(2 * Math.PI),
    elements: (a) => {
      const k = corpseK(a);
      return [
        { angle: firstExtra + a / 2 - k, phase: 0 },
        { angle: 2 * Math.PI - 2 * k, phase: Math.PI },
        { angle: a / 2 - k, phase: 0 },
      ];
    },
    ideal: xGate,
  };
}

const DEFINITIONS: Definition[] = [
  singlePulse('rectangular', 'Rectangular', 'nothing (the plain pulse)'),
  {
    name: 'bb1',
    title: 'BB1',
    corrects: 'amplitude error, to second order',
    source: 'Wimperis, J. Magn. Reson. A 109, 221 (1994)',
    angles: 'angles in (0, 720] degrees (p1 = arccos(-theta/(4 pi)))',
    allows: positive(4 * Math.PI),
    elements: (a, placement) => {
      const p1 = wimperisPhase(a);
      const block = [
        { angle: Math.PI, phase: p1 },
        { angle: 2 * Math.PI, phase: 3 * p1 },
        { angle: Math.PI, phase: p1 },
      ];
      if (placement === 'before') return [...block, { angle: a, phase: 0 }];
      if (placement === 'middle') return [{ angle: a / 2, phase: 0 }, ...block, { angle: a / 2, phase: 0 }];
      return [{ angle: a, phase: 0 }, ...block];
    },
    ideal: xGate,
  },
  {
    name: 'sk1',
    title: 'SK1',
    corrects: 'amplitude error, to first order',
    source: 'Brown, Harrow, Chuang, Phys. Rev. A 70, 052318 (2004)',
    angles: 'angles in (0, 720] degrees (p1 = arccos(-theta/(4 pi)))',
    allows: positive(4 * Math.PI),
    elements: (a) => {
      const p1 = wimperisPhase(a);
      return [
        { angle: a, phase: 0 },
        { angle: 2 * Math.PI, phase: -p1 },
        { angle: 2 * Math.PI, phase: p1 },
      ];
    },
    ideal: xGate,
  },
  corpseFamily('corpse', 'CORPSE', 2 * Math.PI),
  corpseFamily('short-corpse', 'short CORPSE', 0),
  {
    name: 'scrofulous',
    title: 'SCROFULOUS',
    corrects: 'amplitude error, to first order',
    source: CUMMINS,
    // Below 0.01 degrees theta enters t1 - pi/2 ~ pi theta^2 / 16 only through the last
    // few bits of t1, and the built rotation loses its angle.
    angles: `angles in [${SCROFULOUS_MIN_DEG}, ${(Math.floor(SCROFULOUS_MAX_DEG * 100) / 100).toFixed(2)}] degrees (below, the angle is lost to rounding; beyond, sin(t1)/t1 = 2 cos(theta/2)/pi has no solution)`,
    allows: (a) => a >= SCROFULOUS_MIN_DEG * DEG * (1 - 1e-12) && positive(SCROFULOUS_MAX_DEG * DEG)(a),
    elements: (a) => {
      const { t1, p1, p2 } = scrofulousAngles(a);
      return [
        { angle: t1, phase: p1 },
        { angle: Math.PI, phase: p2 },
        { angle: t1, phase: p1 },
      ];
    },
    ideal: xGate,
  },
  {
    name: 'knill',
    title: 'Knill',
    corrects: 'amplitude error and detuning, to first order',
    source: 'Ryan, Hodges, Cory, Phys. Rev. Lett. 105, 200402 (2010)',
    angles: '180 degrees only (its ideal is a pi rotation about the axis at axisDeg - 30 degrees)',
    allows: isPi,
    elements: () => [
      { angle: Math.PI, phase: Math.PI / 6 },
      { angle: Math.PI, phase: 0 },
      { angle: Math.PI, phase: Math.PI / 2 },
      { angle: Math.PI, phase: 0 },
      { angle: Math.PI, phase: Math.PI / 6 },
    ],
    // Without error the five pi pulses make a pi rotation about the axis at -pi/6
    // (equivalently X(pi) followed by a z rotation), so that is what it is compared with.
    ideal: () => ({ kind: 'gate', axis: [Math.cos(-Math.PI / 6), Math.sin(-Math.PI / 6), 0], angleRad: Math.PI }),
  },
  {
    name: '90-180-90',
    title: '90-180-90',
    corrects: 'amplitude error, for the inversion |0> -> |1> only (as a gate it is an uncompensated pi rotation about y)',
    source: 'Levitt & Freeman, J. Magn. Reson. 33, 473 (1979)',
    angles: '180 degrees only (a point-to-point inversion)',
    allows: isPi,
    elements: () => [
      { angle: Math.PI / 2, phase: 0 },
      { angle: Math.PI, phase: Math.PI / 2 },
      { angle: Math.PI / 2, phase: 0 },
    ],
    ideal: () => ({ kind: 'state', from: [0, 0, 1], to: [0, 0, -1] }),
  },
  singlePulse('gaussian', 'Gaussian', 'nothing (a shaped single pulse with a narrower spectrum)', 'gaussian'),
  singlePulse('raised-cosine', 'Raised cosine', 'nothing (a shaped single pulse with a narrower spectrum)', 'raised-cosine'),
];

/** Every sequence with what it corrects and its source, for listings. */
export const compositeNames: readonly CompositeInfo[] = DEFINITIONS.map(({ name, title, corrects, source, angles }) => ({
  name,
  title,
  corrects,
  source,
  angles,
}));

function definitionOf(name: string, field: string): Definition {
  const found = DEFINITIONS.find((d) => d.name === name);
  if (!found) {
    throw new ArgumentError(
      `${field}: ${describeValue(name)} is not a known sequence; one of ${DEFINITIONS.map((d) => d.name).join(', ')}`,
    );
  }
  return found;
}

/** The elements of a sequence for a target about the x axis, in time order (radians). */
export function elementTable(name: CompositeName, angleRad: number, placement: Bb1Placement = 'after'): CompositeElement[] {
  const definition = definitionOf(name, 'name');
  if (!Number.isFinite(angleRad) || !definition.allows(angleRad)) {
    throw new ArgumentError(`angleRad: ${describeValue(angleRad)} is not allowed for ${name}; ${definition.angles}`);
  }
  return definition.elements(isPi(angleRad) ? Math.PI : angleRad, placement);
}

/** Build a composite or shaped pulse under a peak Rabi frequency and a sample period. */
export function buildComposite(name: CompositeName, options: CompositeOptions): Pulse & { metadata: CompositeMetadata } {
  const definition = definitionOf(name, 'name');
  const { angleDeg, axisDeg, rabiMax, dt, placement, sigmas } = checkOptions(name, definition, options);
  const angleRad = isPi(angleDeg * DEG) ? Math.PI : angleDeg * DEG;
  const axisRad = axisDeg * DEG;
  const elements = definition.elements(angleRad, placement).map((e) => ({ angle: e.angle, phase: e.phase + axisRad }));

  let budget = MAX_SAMPLES;
  const plans = elements.map((e) => {
    const plan = definition.shaped
      ? shapedPlan(e.angle, definition.shaped, sigmas, rabiMax, dt, budget)
      : rectangularPlan(e.angle, rabiMax, dt, budget);
    if (!plan) {
      throw new SpecError('dt', dt, `the ${name} pulse would need more samples than allowed at rabiMax ${rabiMax} Hz; at most ${MAX_SAMPLES} in all (raise dt or rabiMax)`);
    }
    budget -= plan.samples;
    return plan;
  });

  const total = MAX_SAMPLES - budget;
  const i = new Float64Array(total);
  const q = new Float64Array(total);
  const built: BuiltElement[] = [];
  let at = 0;
  elements.forEach((e, j) => {
    const plan = plans[j];
    built.push({ angleDeg: e.angle / DEG, phaseDeg: normaliseDeg(e.phase / DEG), firstSample: at, samples: plan.samples, rabiHz: plan.peak });
    for (let k = 0; k < plan.samples; k++, at++) [i[at], q[at]] = sampleWithin(plan.amplitude(k), e.phase, rabiMax);
  });

  const rates = built.map((b) => b.rabiHz);
  const metadata: CompositeMetadata = {
    origin: 'composite',
    name: `${definition.title}${name === 'bb1' ? ` (correction ${placement})` : ''}, ${angleDeg} deg about the axis at ${axisDeg} deg`,
    composite: name,
    source: definition.source,
    corrects: definition.corrects,
    angleDeg,
    axisDeg,
    rabiMax,
    ...(name === 'bb1' ? { placement } : {}),
    ...(definition.shaped === 'gaussian' ? { sigmas } : {}),
    elements: built,
    ideal: rotateIdeal(definition.ideal(angleRad), axisRad),
    rounding: definition.shaped
      ? 'envelope sampled at sample midpoints on the fewest whole samples that keep the peak at or below rabiMax, scaled so that its area gives the angle exactly'
      : 'each element rounded up to a whole number of samples, its amplitude lowered so that its angle stays exact',
    elementRabiSpread: (Math.max(...rates) - Math.min(...rates)) / Math.max(...rates),
  };
  return { dt, i, q, metadata };
}

/** The options checked, with their defaults filled in; errors name the option. */
function checkOptions(name: CompositeName, definition: Definition, options: CompositeOptions) {
  const { angleDeg, rabiMax, dt } = options;
  const axisDeg = options.axisDeg ?? 0;
  if (typeof angleDeg !== 'number' || !Number.isFinite(angleDeg) || !definition.allows(angleDeg * DEG)) {
    throw new SpecError('angleDeg', angleDeg, `${name} takes ${definition.angles}`);
  }
  if (typeof axisDeg !== 'number' || !Number.isFinite(axisDeg)) {
    throw new SpecError('axisDeg', axisDeg, 'a finite phase in degrees (0 = x axis, 90 = y axis)');
  }
  if (typeof rabiMax !== 'number' || !Number.isFinite(rabiMax) || !(rabiMax > 0)) {
    throw new SpecError('rabiMax', rabiMax, 'a finite peak Rabi frequency > 0 (Hz)');
  }
  if (typeof dt !== 'number' || !Number.isFinite(dt) || !(dt > 0)) {
    throw new SpecError('dt', dt, 'a finite sample period > 0 (s)');
  }
  const { placement, sigmas } = options;
  if (placement !== undefined && (name !== 'bb1' || !['after', 'before', 'middle'].includes(placement))) {
    throw new SpecError('placement', placement, name === 'bb1' ? '"after", "before" or "middle"' : 'only bb1 takes a placement');
  }
  if (sigmas !== undefined && (name !== 'gaussian' || typeof sigmas !== 'number' || !(sigmas > 0 && sigmas <= 20))) {
    throw new SpecError('sigmas', sigmas, name === 'gaussian' ? 'a number of standard deviations in (0, 20]' : 'only gaussian takes sigmas');
  }
  return { angleDeg, axisDeg, rabiMax, dt, placement: placement ?? ('after' as Bb1Placement), sigmas: sigmas ?? 3 };
}

/** How one element is sampled: its length, the amplitude of each sample (Hz) and their peak. */
interface Plan {
  samples: number;
  amplitude(k: number): number;
  peak: number;
}

/** A rectangular element on the fewest whole samples at amplitude <= rabiMax that give its angle exactly. */
function rectangularPlan(angle: number, rabiMax: number, dt: number, budget: number): Plan | null {
  const amplitudeFor = (n: number) => angle / (2 * Math.PI * n * dt);
  let n = Math.max(1, Math.ceil(angle / (2 * Math.PI * rabiMax * dt)));
  // The quotient may round up past an exact whole number of samples (dt = duration/segments
  // carries the division's last-bit error: 2e-7/100 = 1.9999999999999997e-9); take one fewer
  // when that fits to 1e-12, holding the amplitude at rabiMax (the angle then errs by 1e-12
  // relative at most, an infidelity near 1e-25).
  if (n > 1 && amplitudeFor(n - 1) <= rabiMax * (1 + 1e-12)) n -= 1;
  if (n > budget) return null;
  const amplitude = Math.min(amplitudeFor(n), rabiMax);
  return { samples: n, amplitude: () => amplitude, peak: amplitude };
}

/** A shaped element: its envelope on the fewest samples whose peak stays <= rabiMax, area exact. */
function shapedPlan(
  angle: number,
  shape: 'gaussian' | 'raised-cosine',
  sigmas: number,
  rabiMax: number,
  dt: number,
  budget: number,
): Plan | null {
  // Sampled at midpoints (k + 1/2)/n of the unit interval; the Gaussian has its centre at
  // 1/2 and standard deviation 1/(2 sigmas), so it is cut at +-sigmas.
  const envelope = (x: number) =>
    shape === 'gaussian' ? Math.exp(-2 * sigmas * sigmas * (x - 0.5) * (x - 0.5)) : Math.sin(Math.PI * x) ** 2;
  // The area bound n >= angle/(2 pi rabiMax dt) is necessary; the peak then falls about
  // as 1/n, so n * peak/rabiMax estimates the length needed and the last steps go one by one.
  let n = Math.max(1, Math.ceil(angle / (2 * Math.PI * rabiMax * dt)));
  for (;;) {
    if (n > budget) return null;
    const e = Float64Array.from({ length: n }, (_, k) => envelope((k + 0.5) / n));
    const scale = angle / (2 * Math.PI * dt * e.reduce((sum, x) => sum + x, 0));
    const samples = e.map((x) => scale * x);
    const peak = samples.reduce((m, x) => Math.max(m, x), 0);
    if (peak <= rabiMax) return { samples: n, amplitude: (k) => samples[k], peak };
    n = Math.max(n + 1, Math.floor(n * (peak / rabiMax)) - 1);
  }
}

/** I and Q of one sample, nudged down by an ulp where cos/sin rounding would lift it above rabiMax. */
function sampleWithin(amplitude: number, phase: number, rabiMax: number): [number, number] {
  let si = amplitude * Math.cos(phase);
  let sq = amplitude * Math.sin(phase);
  while (Math.hypot(si, sq) > rabiMax || si * si + sq * sq > rabiMax * rabiMax) {
    si *= 1 - 2 * Number.EPSILON;
    sq *= 1 - 2 * Number.EPSILON;
  }
  return [si, sq];
}

/** The ideal for an axis at phase phi: the x-axis ideal turned about z by phi (states are unchanged). */
function rotateIdeal(ideal: Target, axisRad: number): Target {
  if (ideal.kind !== 'gate') return ideal;
  const [x, y, z] = ideal.axis;
  const c = Math.cos(axisRad);
  const s = Math.sin(axisRad);
  return { kind: 'gate', axis: [c * x - s * y, s * x + c * y, z], angleRad: ideal.angleRad };
}

function normaliseDeg(deg: number): number {
  const r = deg % 360;
  return r < 0 ? r + 360 : r;
}
