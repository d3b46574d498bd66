// The line's discrete kernels against the continuous responses they discretise
// (docs/physics.md section 5, "The line"): the Gaussian's -3 dB point, RC step responses,
// the tails' cut, and the error function the Gaussian bins use.
import { describe, expect, it } from 'vitest';
import { qubitDrive } from '../../src/core/line.ts';
import { discreteKernel, erf, erfc, gaussianHalfWidth, gaussianSigma, TAIL_FRACTION } from '../../src/core/line-kernel.ts';
import type { Line, LineResponse, Pulse } from '../../src/core/types.ts';
import { heldLineDrive } from '../reference/oracle.ts';
import { expectClose } from '../reference/tolerance.ts';

describe('error function', () => {
  // Source: Python 3's math.erfc and math.erf (the C library's erfc, erf), printed to 17 digits.
  const table: [number, number, number][] = [
    [0.1, 0.8875370839817152, 0.1124629160182849],
    [0.5, 0.4795001221869535, 0.5204998778130465],
    [1, 0.15729920705028513, 0.8427007929497149],
    [2, 0.004677734981047265, 0.9953222650189527],
    [2.9, 4.109787809945886e-5, 0.9999589021219005],
    [5, 1.5374597944280351e-12, 0.9999999999984626],
    [7, 4.183825607779414e-23, 1],
    [10, 2.088487583762545e-45, 1],
  ];
  for (const [x, c, e] of table) {
    it(`erfc(${x}) and erf(${x}) to 1e-14 relative`, () => {
      expectClose(erfc(x), c, { rel: 1e-14 }, `erfc(${x})`);
      expectClose(erf(x), e, { rel: 1e-14 }, `erf(${x})`);
    });
  }
  it('the Gaussian is cut where each tail holds 1e-12 of its area: 7.0345 sigma (Python: erfc(7.034483825826/sqrt 2)/2 = 1.0e-12)', () => {
    expectClose(gaussianHalfWidth(TAIL_FRACTION), 7.034483825826, { rel: 1e-9 }, 'half width');
  });
});

/** DTFT of a kernel at f (taps at lags (j - lead) delta). */
function response(h: Float64Array, lead: number, fine: number, f: number): { re: number; im: number } {
  let re = 0, im = 0;
  h.forEach((v, j) => {
    re += v * Math.cos(2 * Math.PI * f * (j - lead) * fine);
    im -= v * Math.sin(2 * Math.PI * f * (j - lead) * fine);
  });
  return { re, im };
}

describe('Gaussian kernel', () => {
  const cases = [
    { bandwidth: 3e8, fine: 1 / 2.4e9 / 8 },
    { bandwidth: 1e9, fine: 1 / 2.4e9 / 4 },
    { bandwidth: 5e7, fine: 1e-9 },
  ];
  for (const { bandwidth, fine } of cases) {
    it(`${bandwidth / 1e6} MHz on ${(fine * 1e12).toPrecision(4)} ps steps: -3 dB point at the bandwidth (1e-6) and |H(f)| = exp(-ln2 f^2/(2 fc^2))`, () => {
      // Source: the response the spec names, |H(f)| = exp(-ln2 f^2 / (2 fc^2)), -3 dB
      // (1/sqrt 2) at fc. Each tap integrates h over one fine step, which multiplies the
      // spectrum by that step's own transform sinc(f delta) = sin(pi f delta)/(pi f delta)
      // (a handbook identity); it is divided out here. Aliases lie beyond 1/delta, where
      // the Gaussian is below 1e-11 for these cases.
      const { h, lead } = discreteKernel({ kind: 'gaussian', bandwidth }, fine);
      const gain = (f: number): number => {
        const r = response(h, lead, fine, f);
        const x = Math.PI * f * fine;
        return Math.hypot(r.re, r.im) / (Math.sin(x) / x);
      };
      for (const f of [0.25, 0.5, 1, 1.5, 2].map((r) => r * bandwidth)) {
        expectClose(gain(f), Math.exp((-Math.LN2 * f * f) / (2 * bandwidth * bandwidth)), { abs: 1e-9 }, `|H(${f})|`);
      }
      let lo = 0.5 * bandwidth, hi = 2 * bandwidth;
      for (let k = 0; k < 80; k++) {
        const mid = (lo + hi) / 2;
        if (gain(mid) > Math.SQRT1_2) lo = mid;
        else hi = mid;
      }
      expectClose(lo, bandwidth, { rel: 1e-6 }, '-3 dB frequency');
      // Symmetric, so no delay: the phase is 0.
      expect(Math.abs(response(h, lead, fine, bandwidth).im)).toBeLessThan(1e-15);
      // sigma = sqrt(ln 2)/(2 pi fc) (the formula): the kernel's variance is sigma^2 + delta^2/12 (a bin's own variance).
      let variance = 0;
      h.forEach((v, j) => (variance += v * ((j - lead) * fine) ** 2));
      expectClose(variance, gaussianSigma(bandwidth) ** 2 + (fine * fine) / 12, { rel: 1e-9 }, 'variance');
    });
  }
});

function step(n: number, dt: number, amplitude: number): Pulse {
  return { dt, i: new Float64Array(n).fill(amplitude), q: new Float64Array(n), metadata: {} };
}

describe('RC lowpass kernels: step responses', () => {
  const dt = 1 / 2.4e9, oversample = 8, fine = dt / oversample, amplitude = 2e7;
  const lineOf = (bandwidths: number[]): Line => ({ oversample, response: { kind: 'lowpass', bandwidths }, delay: 0, boundOn: 'programmed' });
  const cases: { name: string; bandwidths: number[]; source: string; s: (t: number) => number }[] = [
    {
      name: 'one stage, 400 MHz', bandwidths: [4e8], source: 'first-order RC step response 1 - exp(-t/RC), RC = 1/(2 pi fc) (handbook)',
      s: (t) => 1 - Math.exp(-t * 2 * Math.PI * 4e8),
    },
    {
      name: 'two equal stages, 600 MHz', bandwidths: [6e8, 6e8], source: 'two equal stages: 1 - exp(-t/RC)(1 + t/RC), the Erlang distribution function (handbook)',
      s: (t) => { const x = t * 2 * Math.PI * 6e8; return 1 - Math.exp(-x) * (1 + x); },
    },
    {
      name: 'two stages, 400 and 900 MHz', bandwidths: [4e8, 9e8], source: 'two different stages: 1 - (l2 e^{-l1 t} - l1 e^{-l2 t})/(l2 - l1), the hypoexponential distribution function (handbook)',
      s: (t) => { const l1 = 2 * Math.PI * 4e8, l2 = 2 * Math.PI * 9e8; return 1 - (l2 * Math.exp(-l1 * t) - l1 * Math.exp(-l2 * t)) / (l2 - l1); },
    },
  ];
  for (const c of cases) {
    it(`${c.name}: the drive at each fine step's centre is the step response (1e-11 of the step)`, () => {
      // Source: c.source, named in each case above. Exact discretisation: the drive at the centre (m + 1/2) delta is
      // the continuous response of the held step there.
      const n = 40;
      const drive = qubitDrive(step(n, dt, amplitude), lineOf(c.bandwidths));
      expect(drive.startS).toBe(0);
      let worst = 0;
      for (let m = 0; m < n * oversample; m++) worst = Math.max(worst, Math.abs(drive.i[m] - amplitude * c.s((m + 0.5) * fine)));
      expect(worst / amplitude, c.source).toBeLessThan(1e-11);
      // After the step ends at T = n dt the response decays as s(t) - s(t - T).
      const T = n * dt;
      for (let m = n * oversample; m < drive.i.length; m += 37) {
        const t = (m + 0.5) * fine;
        expect(Math.abs(drive.i[m] - amplitude * (c.s(t) - c.s(t - T))) / amplitude).toBeLessThan(1e-11);
      }
    });
  }
});

describe('tails', () => {
  const fine = 1 / 2.4e9 / 8;
  const responses: LineResponse[] = [{ kind: 'gaussian', bandwidth: 3e8 }, { kind: 'lowpass', bandwidths: [2e8, 3e8] }];
  for (const r of responses) {
    it(`${r.kind}: cutting at 1e-12 of the area moves the drive by at most 3e-12 of its peak against a cut at 1e-16`, () => {
      // Source: a plain direct convolution (tests/reference/oracle.ts) with both kernels;
      // what the cut leaves out is below 1e-12 of the area on each side, so the drive,
      // a weighted mean of the samples, moves by at most about twice that times the peak.
      const cut = discreteKernel(r, fine), long = discreteKernel(r, fine, 1e-16);
      expect(long.h.length).toBeGreaterThan(cut.h.length);
      const i = Array.from({ length: 30 }, (_, k) => 1e7 * Math.sin(k / 3)), q = i.map((v) => -v / 2);
      const a = heldLineDrive(i, q, cut.h, 8), b = heldLineDrive(i, q, long.h, 8);
      const shift = long.lead - cut.lead;
      let worst = 0;
      for (let m = 0; m < b.i.length; m++) worst = Math.max(worst, Math.abs((a.i[m - shift] ?? 0) - b.i[m]));
      expect(worst / 1e7).toBeLessThan(3e-12);
    });
  }
});
