// The held pulse's spectrum (src/core/spectrum.ts) against closed forms: the Fourier
// transform of a rectangle is a sinc with nulls at multiples of 1/T (handbook identity,
// e.g. Bracewell, The Fourier Transform and Its Applications, ch. 4), the shift theorem,
// the direct sum, and first-order time-dependent perturbation theory of the model
// (Sakurai, Modern Quantum Mechanics, sec. 5.6) through the plain-TypeScript oracle.
import { describe, expect, it } from 'vitest';
import { decibels, fftPlus, heldSpectrum, heldSpectrumAt, sinc } from '../../src/core/spectrum.ts';
import type { Pulse } from '../../src/core/types.ts';
import { pulsePropagator } from '../reference/oracle.ts';
import { expectClose } from '../reference/tolerance.ts';

const pulseOf = (dt: number, i: number[], q: number[] = i.map(() => 0)): Pulse => ({ dt, i: Float64Array.from(i), q: Float64Array.from(q), metadata: {} });

describe('spectrum of a held pulse', () => {
  it('of a rectangle is A T |sinc(D T)|, with nulls at every multiple of 1/T', () => {
    const n = 100;
    const dt = 2e-9;
    const amplitude = 5e6;
    const T = n * dt;
    const pulse = pulseOf(dt, new Array(n).fill(amplitude));
    const span = { min: -40e6, max: 40e6, points: 4001, levels: [-3] };
    const s = heldSpectrum(pulse, span);
    expect(s.detuning.length).toBeGreaterThan(1000);
    // The held rectangle is exactly rect(t/T): its transform is A T sinc(D T) at every D (handbook identity).
    for (let k = 0; k < s.detuning.length; k++) {
      expectClose(s.magnitude[k], amplitude * T * Math.abs(sinc(s.detuning[k] * T)), { abs: 1e-12 * amplitude * T }, `|X| at ${s.detuning[k]} Hz`);
    }
    expectClose(s.reference, amplitude * T, { rel: 1e-12 }, 'the 0 dB reference, |X(0)| = pulse area');
    // The -3 dB points: sinc(x) = 10^(-3/20) on the main lobe, solved here by bisection (x is
    // about 0.4422; the half-power 0.44295 of the handbooks is -3.0103 dB), to the grid's spacing.
    let [lo, hi] = [0, 1];
    for (let k = 0; k < 60; k++) [lo, hi] = sinc((lo + hi) / 2) > 10 ** (-3 / 20) ? [(lo + hi) / 2, hi] : [lo, (lo + hi) / 2];
    expect(lo).toBeCloseTo(0.4422, 3);
    expect(Math.abs(s.levels[0].to - lo / T)).toBeLessThanOrEqual(s.resolution);
    expect(Math.abs(s.levels[0].from + lo / T)).toBeLessThanOrEqual(s.resolution);
    // Nulls at D = m / T (m != 0), by the direct sum.
    for (const m of [1, 2, 3, -1, -5, 7]) {
      const x = heldSpectrumAt(pulse, m / T);
      expect(Math.hypot(x.re, x.im) / (amplitude * T), `null at ${m}/T`).toBeLessThan(1e-12);
    }
    // Between the first nulls the main lobe, -13.26 dB side lobes (sinc's first side lobe, handbook value).
    const side = heldSpectrumAt(pulse, 1.4303 / T);
    expect(decibels(Math.hypot(side.re, side.im), amplitude * T)).toBeCloseTo(-13.26, 1);
  });

  it('includes the sinc envelope of the hold beyond the Nyquist frequency', () => {
    // One sample: X(D) = c dt sinc(D dt) exp(i pi D dt), zero at D = 1/dt although the DFT repeats there.
    const dt = 1e-8;
    const pulse = pulseOf(dt, [3e6]);
    const at = (d: number) => Math.hypot(heldSpectrumAt(pulse, d).re, heldSpectrumAt(pulse, d).im);
    expectClose(at(0.5 / dt), 3e6 * dt * (2 / Math.PI), { rel: 1e-12 }, 'at the Nyquist frequency, sinc(1/2) = 2/pi');
    expect(at(1 / dt)).toBeLessThan(1e-12 * 3e6 * dt);
    const s = heldSpectrum(pulse, { min: -2 / dt, max: 2 / dt, points: 801 });
    for (let k = 0; k < s.detuning.length; k++) expectClose(s.magnitude[k], 3e6 * dt * Math.abs(sinc(s.detuning[k] * dt)), { abs: 1e-12 * 3e6 * dt }, 'held single sample');
  });

  it('agrees with the direct sum for a random complex pulse, and moves by the shift theorem', () => {
    let seed = 7;
    const random = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) * 2 - 1;
    const n = 333;
    const dt = 1e-9;
    const i = Array.from({ length: n }, () => 1e7 * random());
    const q = Array.from({ length: n }, () => 1e7 * random());
    const pulse = pulseOf(dt, i, q);
    const s = heldSpectrum(pulse, { min: -3e8, max: 3e8, points: 20001 });
    for (let k = 0; k < s.detuning.length; k += 97) {
      const x = heldSpectrumAt(pulse, s.detuning[k]);
      expectClose(s.magnitude[k], Math.hypot(x.re, x.im), { abs: 1e-10 * s.reference }, `FFT against the direct sum at ${s.detuning[k]} Hz`);
    }
    // Shift theorem: c_k exp(-2 pi i f0 t_k) moves the spectrum of a rectangle to D = +f0 in this convention.
    const f0 = 20e6;
    const rect = Array.from({ length: 200 }, (_, k) => k);
    const shifted = pulseOf(dt, rect.map((k) => 1e6 * Math.cos(-2 * Math.PI * f0 * k * dt)), rect.map((k) => 1e6 * Math.sin(-2 * Math.PI * f0 * k * dt)));
    const t = heldSpectrum(shifted, { min: -50e6, max: 50e6, points: 2001 });
    let peak = 0;
    for (let k = 1; k < t.magnitude.length; k++) if (t.magnitude[k] > t.magnitude[peak]) peak = k;
    expect(Math.abs(t.detuning[peak] - f0)).toBeLessThanOrEqual(t.resolution);
  });

  it('is the weak-drive excitation profile: P(|1>) = pi^2 |X(D)|^2 to first order (checked against the oracle)', () => {
    // A weak, shaped, complex pulse: 200 samples of 10 ns, about 1e-3 turns of area.
    const n = 200;
    const dt = 1e-8;
    const i = Array.from({ length: n }, (_, k) => 800 * Math.sin((Math.PI * (k + 0.5)) / n) ** 2);
    const q = Array.from({ length: n }, (_, k) => 300 * Math.sin((2 * Math.PI * (k + 0.5)) / n));
    const pulse = pulseOf(dt, i, q);
    for (const detuning of [0, 1.3e5, -1.3e5, 4e5, -7e5, 2.2e6]) {
      const u = pulsePropagator(pulse, { detuning, amplitudeError: 0, weight: 1 });
      const excited = u.vr * u.vr + u.vi * u.vi; // |<1|U|0>|^2: U's first column is (u, v)
      const x = heldSpectrumAt(pulse, detuning);
      const firstOrder = Math.PI ** 2 * (x.re * x.re + x.im * x.im);
      // Second-order terms are of relative size (pi |X|)^2, about 1e-5 here.
      if (firstOrder > 1e-14) expectClose(excited, firstOrder, { rel: 1e-3 }, `P(|1>) at detuning ${detuning} Hz`);
      else expect(excited).toBeLessThan(1e-12);
    }
    // The sign matters: a pulse turning one way excites one side of the line only.
    const f0 = 1e6;
    const turning = pulseOf(dt, i.map((a, k) => a * Math.cos(-2 * Math.PI * f0 * (k + 0.5) * dt)), i.map((a, k) => a * Math.sin(-2 * Math.PI * f0 * (k + 0.5) * dt)));
    const p = (detuning: number) => {
      const u = pulsePropagator(turning, { detuning, amplitudeError: 0, weight: 1 });
      return u.vr * u.vr + u.vi * u.vi;
    };
    expect(p(f0)).toBeGreaterThan(1000 * p(-f0));
    const at = (d: number) => Math.hypot(heldSpectrumAt(turning, d).re, heldSpectrumAt(turning, d).im);
    expect(at(f0)).toBeGreaterThan(30 * at(-f0));
  });

  it('FFT: a unit impulse gives all ones, and a tone lands in its bin (definition of the DFT)', () => {
    const re = new Float64Array(16);
    const im = new Float64Array(16);
    re[0] = 1;
    fftPlus(re, im);
    for (let k = 0; k < 16; k++) expect([re[k], im[k]]).toEqual([1, 0]);
    const a = new Float64Array(64);
    const b = new Float64Array(64);
    for (let k = 0; k < 64; k++) {
      a[k] = Math.cos((-2 * Math.PI * 5 * k) / 64);
      b[k] = Math.sin((-2 * Math.PI * 5 * k) / 64);
    }
    fftPlus(a, b);
    for (let m = 0; m < 64; m++) expectClose(Math.hypot(a[m], b[m]), m === 5 ? 64 : 0, { abs: 1e-12 }, `bin ${m}`);
  });

  it('refuses a span it cannot draw, naming it', () => {
    const pulse = pulseOf(1e-9, [1, 2]);
    expect(() => heldSpectrum(pulse, { min: 5, max: 5, points: 10 })).toThrow(/span: from 5 Hz to 5 Hz is not allowed/);
    expect(() => heldSpectrum(pulse, { min: 0, max: 5, points: 1 })).toThrow(/points: 1 is not allowed/);
  });
});
