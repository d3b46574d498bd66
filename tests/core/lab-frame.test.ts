// The model against the physics it stands for: a qubit in the laboratory frame,
//   H_lab(t) = 2 pi [ -(f_q/2) sz + s(t) sx ],   s(t) = I(t) cos(2 pi f_d t) + Q(t) sin(2 pi f_d t),
// with |0> the ground state (+z), driven at f_d by a real signal that carries I and Q by
// the upconversion convention of docs/physics.md section 5. Its propagator is computed by
// mathjs `expm` over fine steps (the exponential of H at each step's midpoint), then moved
// to the frame of the drive, U_rot = exp(+i 2 pi f_d T sz / 2)^dag U_lab. The rotating-wave
// approximation of that frame is the model H = 2 pi [ -(Delta/2) sz + (I sx + Q sy)/2 ],
// Delta = f_q - f_d (docs/physics.md section 1; the standard derivation, Krantz et al.,
// Appl. Phys. Rev. 6, 021318, 2019, on single-qubit control). What the approximation drops, the
// counter-rotating term, as strong as the drive but turning at 2 f_d, leaves the
// Bloch-Siegert residue (Bloch & Siegert, Phys. Rev. 57, 522, 1940): a wiggle of the
// rotation angle of up to Omega / (2 f_d) rad and a frequency shift of order
// Omega^2 / (4 f_d) Hz (recalled from memory), which turns the state by
// 2 pi Omega^2 T / (4 f_d) rad over a drive of duration T; sqrt(1 - F), the sine of half
// the angle, moves by at most Omega / (4 f_d) + pi Omega^2 T / (4 f_d). Both vanish
// as 1/f_d at fixed Omega and Delta: the lab frame and the library must agree to that size,
// and the error must shrink in proportion as f_d grows. A wrong sign of Delta or of Q
// misses by a rotation of order one instead.
import { describe, expect, it } from 'vitest';
import { add, complex, expm, matrix, multiply, type Complex, type Matrix } from 'mathjs';
import { design, evaluateMembers, robustnessMap } from '../../src/core/api.ts';
import type { Member, Pulse, Target, Vec3 } from '../../src/core/types.ts';

const C = (re: number, im = 0) => complex(re, im);
const SX = matrix([[C(0), C(1)], [C(1), C(0)]]);
const SZ = matrix([[C(1), C(0)], [C(0), C(-1)]]);
const ID = matrix([[C(1), C(0)], [C(0), C(1)]]);

/** Midpoint steps per carrier period: the integration error stays below 1e-3 of the residue checked. */
const STEPS_PER_PERIOD = 64;

/**
 * The lab-frame propagator moved to the frame of the drive, as the quaternion (w0, wx, wy, wz)
 * of U = w0 1 - i (w . s); the pulse's sample k is held over [k dt, (k+1) dt) and the carrier's
 * phase is zero at t = 0. `qSign` is the sign Q carries in the signal at the qubit.
 */
function labFrame(pulse: Pulse, qubitHz: number, driveHz: number, qSign: 1 | -1 = 1): [number, number, number, number] {
  const T = pulse.dt * pulse.i.length;
  const steps = Math.ceil(T * driveHz * STEPS_PER_PERIOD);
  const h = T / steps;
  let u = ID;
  for (let n = 0; n < steps; n++) {
    const t = (n + 0.5) * h;
    const k = Math.min(pulse.i.length - 1, Math.floor(t / pulse.dt));
    const w = 2 * Math.PI * driveHz * t;
    const s = pulse.i[k] * Math.cos(w) + qSign * pulse.q[k] * Math.sin(w);
    const H = add(multiply(-Math.PI * qubitHz, SZ), multiply(2 * Math.PI * s, SX)) as Matrix;
    u = multiply(expm(multiply(H, C(0, -h)) as Matrix), u) as Matrix;
  }
  // |psi_lab> = exp(+i 2 pi f_d t sz/2) |psi_rot>, so U_rot = exp(-i 2 pi f_d T sz/2) U_lab.
  const phase = Math.PI * driveHz * T;
  const frame = matrix([[C(Math.cos(phase), -Math.sin(phase)), C(0)], [C(0), C(Math.cos(phase), Math.sin(phase))]]);
  const U = (multiply(frame, u) as Matrix).toArray() as unknown as Complex[][];
  // U = [[w0 - i wz, -wy - i wx], [wy - i wx, w0 + i wz]].
  const a = complex(U[0][0]);
  const c = complex(U[1][0]);
  return [a.re, -c.im, c.re, -a.im];
}

/** The quaternion as a gate target R_n(theta), theta = 2 atan2(|w|, w0). */
function asTarget([w0, wx, wy, wz]: number[]): Target {
  const norm = Math.hypot(wx, wy, wz);
  return { kind: 'gate', axis: [wx / norm, wy / norm, wz / norm] as Vec3, angleRad: 2 * Math.atan2(norm, w0) };
}

/** 1 - |Tr(V^dag U)|^2 / 4 of two quaternions: their dot product is Tr(V^dag U) / 2. */
function infidelity(v: number[], w: number[]): number {
  const dot = v[0] * w[0] + v[1] * w[1] + v[2] * w[2] + v[3] * w[3];
  return 1 - dot * dot;
}

const one = (detuning: number): Member[] => [{ detuning, amplitudeError: 0, weight: 1 }];

describe('the model against a lab-frame simulation (rotating-wave approximation)', () => {
  // A shaped pulse with both quadratures: I a sine lobe of 1 MHz, Q a cosine of 0.6 MHz.
  const n = 8;
  const T = 0.5e-6;
  const pulse: Pulse = { dt: T / n, i: new Float64Array(n), q: new Float64Array(n), metadata: {} };
  for (let k = 0; k < n; k++) {
    pulse.i[k] = 1e6 * Math.sin((Math.PI * (k + 0.5)) / n);
    pulse.q[k] = 0.6e6 * Math.cos((2 * Math.PI * (k + 0.5)) / n);
  }
  const peak = Math.max(...Array.from(pulse.i, (x, k) => Math.hypot(x, pulse.q[k])));
  const qNegated: Pulse = { ...pulse, q: pulse.q.map((x) => -x) };
  /** The Bloch-Siegert residue estimated above, as an upper bound on sqrt(1 - F). */
  const residue = (driveHz: number) => peak / (4 * driveHz) + (Math.PI * peak * peak * T) / (4 * driveHz);

  for (const detuning of [0.4e6, -0.4e6]) {
    const label = detuning > 0 ? 'qubit above the drive' : 'qubit below the drive';
    it(`agrees to the Bloch-Siegert residue, shrinking as 1/f_d (Delta = ${detuning / 1e6} MHz, ${label})`, () => {
      const distances: number[] = [];
      // Whole carrier cycles per sample (dt = 62.5 ns), so the carrier meets every sample
      // boundary at the same phase and only f_d changes between the three runs.
      for (const driveHz of [32e6, 64e6, 128e6]) {
        const lab = labFrame(pulse, driveHz + detuning, driveHz);
        // The library's evaluate against the lab-frame propagator as the target: 1 - F = |w|^2.
        const model = evaluateMembers(asTarget(lab), pulse, one(detuning)).meanInfidelity;
        const d = Math.sqrt(model);
        expect(d, `f_d = ${driveHz / 1e6} MHz`).toBeLessThan(residue(driveHz));
        expect(d, `f_d = ${driveHz / 1e6} MHz: the residue is there to see`).toBeGreaterThan(residue(driveHz) / 20);
        distances.push(d);
        // A sign error in Delta or in Q misses by a rotation of order one.
        const wrongDelta = evaluateMembers(asTarget(lab), pulse, one(-detuning)).meanInfidelity;
        const wrongQ = evaluateMembers(asTarget(lab), qNegated, one(detuning)).meanInfidelity;
        expect(wrongDelta).toBeGreaterThan(0.3);
        expect(wrongQ).toBeGreaterThan(0.03);
        expect(Math.min(wrongDelta, wrongQ)).toBeGreaterThan(100 * model);
      }
      // Doubling f_d halves the residue (higher orders in Omega/f_d add a little at 32 MHz).
      for (const k of [1, 2]) {
        expect(distances[k - 1] / distances[k]).toBeGreaterThan(1.7);
        expect(distances[k - 1] / distances[k]).toBeLessThan(2.6);
      }
    });
  }

  it('with the signal I cos - Q sin at the qubit, it is the pulse with Q negated that the model describes', () => {
    const detuning = 0.4e6;
    const driveHz = 40e6;
    const lab = labFrame(pulse, driveHz + detuning, driveHz, -1);
    const asNegated = evaluateMembers(asTarget(lab), qNegated, one(detuning)).meanInfidelity;
    const asDesigned = evaluateMembers(asTarget(lab), pulse, one(detuning)).meanInfidelity;
    expect(Math.sqrt(asNegated)).toBeLessThan(residue(driveHz));
    expect(asDesigned).toBeGreaterThan(100 * asNegated);
  });
});

describe('an asymmetric ensemble is made robust on its own side', () => {
  // A qubit that drifts only upward: detuning Delta = f_q - f_d in [0, +300 kHz]. The design
  // must be good for a qubit above the drive and need not be for one below it.
  const spec = {
    target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
    duration: 1e-6,
    segments: 40,
    rabiMax: 1e6,
    ensemble: { detuning: { min: 0, max: 3e5, points: 7 }, amplitudeError: { values: [0] } },
    optimizer: { starts: 2, seed: 3, maxIterations: 400 },
  };
  const x90: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
  const x90Quaternion = [Math.cos(Math.PI / 4), Math.sin(Math.PI / 4), 0, 0];

  it('its map is good for Delta > 0 and not for Delta < 0, and the lab frame agrees: good with the qubit above the drive', async () => {
    const result = await design(spec);
    const at = (detuning: number) => evaluateMembers(x90, result.pulse, one(detuning)).meanInfidelity;
    // The robustness map over -300..+300 kHz (13 points, 50 kHz apart): the half Delta > 0
    // is the ensemble's side, Delta < 0 its mirror image.
    const map = robustnessMap(x90, result.pulse, { min: -3e5, max: 3e5, points: 13 }, { min: 0, max: 0, points: 1 });
    const mean = (x: ArrayLike<number>) => Array.from(x).reduce((s, v) => s + v, 0) / x.length;
    const below0 = map.infidelity.subarray(0, 6);
    const above0 = map.infidelity.subarray(7, 13);
    expect(mean(above0)).toBeLessThan(1e-3);
    expect(mean(below0)).toBeGreaterThan(10 * mean(above0));

    // Lab frame at f_d = 100 MHz, qubit 200 kHz above, then 200 kHz below the drive. sqrt(1 - F)
    // is a distance between propagators, so lab and model differ in it by at most the
    // Bloch-Siegert residue, 1e6 / (4 f_d) + pi (1e6)^2 T / (4 f_d) = 1.0e-2 here.
    const driveHz = 100e6;
    const bound = 1e6 / (4 * driveHz) + (Math.PI * 1e12 * spec.duration) / (4 * driveHz);
    const above = infidelity(x90Quaternion, labFrame(result.pulse, driveHz + 0.2e6, driveHz));
    const below = infidelity(x90Quaternion, labFrame(result.pulse, driveHz - 0.2e6, driveHz));
    expect(Math.abs(Math.sqrt(above) - Math.sqrt(at(0.2e6)))).toBeLessThan(bound);
    expect(Math.abs(Math.sqrt(below) - Math.sqrt(at(-0.2e6)))).toBeLessThan(bound);
    expect(below).toBeGreaterThan(10 * above);
  });
});
