// Plain TypeScript reference of the transmon ladder (docs/transmon.md): the test oracle
// of assembly/ladder*.ts. Written to be read, independent of the kernels' method: dense
// complex matrices, the exponential by a Taylor series with scaling and squaring (many
// terms, not an eigendecomposition), segment derivatives from Van Loan's block-triangular
// exponential (IEEE Trans. Autom. Control 23, 395, 1978), and figures from Pauli traces.
import type { Pulse, Target } from '../../src/core/types.ts';
import type { LadderMember, LadderSystem } from '../../src/core/ladder.ts';
import { blochToSpinor, targetUnitary, toMatrix } from './oracle.ts';

/** A dense complex matrix, row-major. */
export interface CMatrix {
  rows: number;
  cols: number;
  re: number[];
  im: number[];
}

/** A rows x cols zero matrix. */
export function zeros(rows: number, cols: number): CMatrix {
  return { rows, cols, re: new Array(rows * cols).fill(0), im: new Array(rows * cols).fill(0) };
}

/** The n x n identity. */
export function eye(n: number): CMatrix {
  const m = zeros(n, n);
  for (let k = 0; k < n; k++) m.re[k * n + k] = 1;
  return m;
}

/** a b. */
export function mul(a: CMatrix, b: CMatrix): CMatrix {
  const out = zeros(a.rows, b.cols);
  for (let r = 0; r < a.rows; r++) {
    for (let c = 0; c < b.cols; c++) {
      let re = 0, im = 0;
      for (let k = 0; k < a.cols; k++) {
        const ar = a.re[r * a.cols + k], ai = a.im[r * a.cols + k];
        const br = b.re[k * b.cols + c], bi = b.im[k * b.cols + c];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      out.re[r * out.cols + c] = re;
      out.im[r * out.cols + c] = im;
    }
  }
  return out;
}

/** s a + t b for complex s = [re, im], real t. */
function axpy(a: CMatrix, s: [number, number], b: CMatrix, t: number): CMatrix {
  const out = zeros(a.rows, a.cols);
  for (let k = 0; k < a.re.length; k++) {
    out.re[k] = s[0] * a.re[k] - s[1] * a.im[k] + t * b.re[k];
    out.im[k] = s[0] * a.im[k] + s[1] * a.re[k] + t * b.im[k];
  }
  return out;
}

/** The conjugate transpose. */
export function adjoint(a: CMatrix): CMatrix {
  const out = zeros(a.cols, a.rows);
  for (let r = 0; r < a.rows; r++) {
    for (let c = 0; c < a.cols; c++) {
      out.re[c * a.rows + r] = a.re[r * a.cols + c];
      out.im[c * a.rows + r] = -a.im[r * a.cols + c];
    }
  }
  return out;
}

function norm1(a: CMatrix): number {
  let best = 0;
  for (let c = 0; c < a.cols; c++) {
    let s = 0;
    for (let r = 0; r < a.rows; r++) s += Math.hypot(a.re[r * a.cols + c], a.im[r * a.cols + c]);
    best = Math.max(best, s);
  }
  return best;
}

/** exp(a) by a Taylor series on a / 2^s (norm below 1/2) and s squarings. */
export function expmTaylor(a: CMatrix): CMatrix {
  const s = Math.max(0, Math.ceil(Math.log2(norm1(a) / 0.5)));
  const scaled = axpy(a, [2 ** -s, 0], a, 0);
  let sum = eye(a.rows);
  let term = eye(a.rows);
  // Terms of a norm below 1/2 shrink at least twofold: 60 is far past rounding.
  for (let k = 1; k <= 60; k++) {
    term = axpy(mul(term, scaled), [1 / k, 0], term, 0);
    sum = axpy(sum, [1, 0], term, 1);
  }
  for (let k = 0; k < s; k++) sum = mul(sum, sum);
  return sum;
}

/** H (rad/s) of the ladder model for one sample: 2 pi [Delta n + alpha/2 n(n-1) + (1+eps)/2 (conj(W) a + W a^dag)]. */
export function ladderHamiltonian(d: number, iHz: number, qHz: number, member: LadderMember, system: LadderSystem): CMatrix {
  const alpha = system.anharmonicity + member.anharmonicityError;
  const h = zeros(d, d);
  for (let n = 0; n < d; n++) h.re[n * d + n] = 2 * Math.PI * (member.detuning * n + (alpha / 2) * n * (n - 1));
  const drive = Math.PI * (1 + member.amplitudeError);
  for (let k = 1; k < d; k++) {
    // <k-1| conj(W) a |k> = conj(W) sqrt(k); <k| W a^dag |k-1> = W sqrt(k)
    h.re[(k - 1) * d + k] = drive * iHz * Math.sqrt(k);
    h.im[(k - 1) * d + k] = -drive * qHz * Math.sqrt(k);
    h.re[k * d + k - 1] = drive * iHz * Math.sqrt(k);
    h.im[k * d + k - 1] = drive * qHz * Math.sqrt(k);
  }
  return h;
}

/** dH/dI and dH/dQ (rad/s per Hz). */
function driveDerivatives(d: number, member: LadderMember): { dI: CMatrix; dQ: CMatrix } {
  const dI = zeros(d, d), dQ = zeros(d, d);
  const drive = Math.PI * (1 + member.amplitudeError);
  for (let k = 1; k < d; k++) {
    dI.re[(k - 1) * d + k] = dI.re[k * d + k - 1] = drive * Math.sqrt(k);
    dQ.im[(k - 1) * d + k] = -drive * Math.sqrt(k);
    dQ.im[k * d + k - 1] = drive * Math.sqrt(k);
  }
  return { dI, dQ };
}

/** exp(-i H dt) of one segment. */
export function ladderSegment(d: number, dt: number, iHz: number, qHz: number, member: LadderMember, system: LadderSystem): CMatrix {
  return expmTaylor(axpy(ladderHamiltonian(d, iHz, qHz, member, system), [0, -dt], eye(d), 0));
}

/**
 * d exp(-i H dt)/dc for a direction dH: the upper-right block of
 * exp([[-i H dt, -i dH dt], [0, -i H dt]]) (Van Loan 1978, theorem 1).
 */
export function segmentDerivative(h: CMatrix, dh: CMatrix, dt: number): CMatrix {
  const d = h.rows;
  const big = zeros(2 * d, 2 * d);
  for (let r = 0; r < d; r++) {
    for (let c = 0; c < d; c++) {
      for (const [br, bc, m] of [[0, 0, h], [d, d, h], [0, d, dh]] as const) {
        big.re[(r + br) * 2 * d + c + bc] = dt * m.im[r * d + c];
        big.im[(r + br) * 2 * d + c + bc] = -dt * m.re[r * d + c];
      }
    }
  }
  const e = expmTaylor(big);
  const out = zeros(d, d);
  for (let r = 0; r < d; r++) {
    for (let c = 0; c < d; c++) {
      out.re[r * d + c] = e.re[r * 2 * d + c + d];
      out.im[r * d + c] = e.im[r * 2 * d + c + d];
    }
  }
  return out;
}

/** The pulse's propagator U = U_N ... U_1 on d levels for one member. */
export function ladderPulsePropagator(pulse: Pulse, member: LadderMember, system: LadderSystem): CMatrix {
  let u = eye(system.levels);
  for (let k = 0; k < pulse.i.length; k++) u = mul(ladderSegment(system.levels, pulse.dt, pulse.i[k], pulse.q[k], member, system), u);
  return u;
}

const PAULI: [number, number][][][] = [
  [[[0, 0], [1, 0]], [[1, 0], [0, 0]]],
  [[[0, 0], [0, -1]], [[0, 1], [0, 0]]],
  [[[1, 0], [0, 0]], [[0, 0], [-1, 0]]],
];

/** Figures of one member from its total propagator u (and, for the gradient, a direction du). */
interface MemberFigures {
  infidelity: number;
  leakage: number;
  phase: number;
  /** The figure's derivative along du. */
  slope: (du: CMatrix) => number;
}

/** Gate: J = L + |w|^2 with W = V^dag M = w0 - i w.sigma, w_j = i Tr(sigma_j W)/2, L the leaked populations / 2. */
export function ladderFigures(u: CMatrix, target: Target, freePhaseAfter = false): MemberFigures {
  const d = u.rows;
  if (target.kind === 'state') {
    const from = blochToSpinor(target.from), to = blochToSpinor(target.to);
    // |to_perp> = (-conj b, conj a) for |to> = (a, b).
    const perp: [number, number][] = [[-to.re[1], to.im[1]], [to.re[0], -to.im[0]]];
    const column = (m: CMatrix): [number, number][] => Array.from({ length: d }, (_, r) => {
      let re = 0, im = 0;
      for (let c = 0; c < 2; c++) {
        re += m.re[r * d + c] * from.re[c] - m.im[r * d + c] * from.im[c];
        im += m.re[r * d + c] * from.im[c] + m.im[r * d + c] * from.re[c];
      }
      return [re, im];
    });
    const overlap = (col: [number, number][]): [number, number] => {
      let re = 0, im = 0;
      for (let r = 0; r < 2; r++) {
        re += perp[r][0] * col[r][0] + perp[r][1] * col[r][1];
        im += perp[r][0] * col[r][1] - perp[r][1] * col[r][0];
      }
      return [re, im];
    };
    const col = column(u);
    const z = overlap(col);
    let leakage = 0;
    for (let r = 2; r < d; r++) leakage += col[r][0] ** 2 + col[r][1] ** 2;
    return {
      infidelity: z[0] ** 2 + z[1] ** 2 + leakage, leakage, phase: 0,
      slope: (du) => {
        const dcol = column(du);
        const dz = overlap(dcol);
        let s = 2 * (z[0] * dz[0] + z[1] * dz[1]);
        for (let r = 2; r < d; r++) s += 2 * (col[r][0] * dcol[r][0] + col[r][1] * dcol[r][1]);
        return s;
      },
    };
  }
  const v = toMatrix(targetUnitary(target));
  let vdag = zeros(2, 2);
  for (let r = 0; r < 2; r++) for (let c = 0; c < 2; c++) { vdag.re[r * 2 + c] = v[c][r][0]; vdag.im[r * 2 + c] = -v[c][r][1]; }
  const block = (m: CMatrix): CMatrix => {
    const b = zeros(2, 2);
    for (let r = 0; r < 2; r++) for (let c = 0; c < 2; c++) { b.re[r * 2 + c] = m.re[r * d + c]; b.im[r * 2 + c] = m.im[r * d + c]; }
    return b;
  };
  let phase = 0;
  if (freePhaseAfter) {
    // Tr(V^dag Rz(p) M) = Tr(Rz(p) M V^dag): largest in modulus at p = arg N00 - arg N11.
    const n = mul(block(u), vdag);
    phase = Math.atan2(n.im[0], n.re[0]) - Math.atan2(n.im[3], n.re[3]);
    phase = Math.atan2(Math.sin(phase), Math.cos(phase));
    const rz = zeros(2, 2);
    rz.re[0] = Math.cos(phase / 2); rz.im[0] = -Math.sin(phase / 2);
    rz.re[3] = Math.cos(phase / 2); rz.im[3] = Math.sin(phase / 2);
    vdag = mul(vdag, rz);
  }
  const wVector = (m: CMatrix): [number, number][] => {
    const w = mul(vdag, block(m));
    return PAULI.map((s) => {
      // i Tr(s W) / 2
      let re = 0, im = 0;
      for (let r = 0; r < 2; r++) {
        for (let c = 0; c < 2; c++) {
          re += s[r][c][0] * w.re[c * 2 + r] - s[r][c][1] * w.im[c * 2 + r];
          im += s[r][c][0] * w.im[c * 2 + r] + s[r][c][1] * w.re[c * 2 + r];
        }
      }
      return [-im / 2, re / 2];
    });
  };
  const w = wVector(u);
  let leakage = 0;
  for (let r = 2; r < d; r++) for (let c = 0; c < 2; c++) leakage += (u.re[r * d + c] ** 2 + u.im[r * d + c] ** 2) / 2;
  const infidelity = leakage + w.reduce((s, x) => s + x[0] ** 2 + x[1] ** 2, 0);
  return {
    infidelity, leakage, phase,
    slope: (du) => {
      const dw = wVector(du);
      let s = 0;
      for (let j = 0; j < 3; j++) s += 2 * (w[j][0] * dw[j][0] + w[j][1] * dw[j][1]);
      for (let r = 2; r < d; r++) for (let c = 0; c < 2; c++) s += u.re[r * d + c] * du.re[r * d + c] + u.im[r * d + c] * du.im[r * d + c];
      return s;
    },
  };
}

/** Weighted mean figure, per-member figures and leakage, and the exact gradient (per Hz). */
export function ladderEnsembleGradient(
  target: Target, pulse: Pulse, members: LadderMember[], system: LadderSystem, freePhaseAfter = false,
): { mean: number; perMember: number[]; leakage: number[]; phase: number[]; gradI: number[]; gradQ: number[] } {
  const n = pulse.i.length, d = system.levels;
  const total = members.reduce((s, m) => s + m.weight, 0);
  const gradI = new Array(n).fill(0), gradQ = new Array(n).fill(0);
  const perMember: number[] = [], leakage: number[] = [], phase: number[] = [];
  let mean = 0;
  for (const member of members) {
    const w = member.weight / total;
    const segments = Array.from({ length: n }, (_, k) => ladderSegment(d, pulse.dt, pulse.i[k], pulse.q[k], member, system));
    const before: CMatrix[] = [eye(d)];
    for (let k = 0; k < n; k++) before.push(mul(segments[k], before[k]));
    const after: CMatrix[] = new Array(n + 1);
    after[n] = eye(d);
    for (let k = n - 1; k >= 0; k--) after[k] = mul(after[k + 1], segments[k]);
    const fig = ladderFigures(before[n], target, freePhaseAfter);
    perMember.push(fig.infidelity);
    leakage.push(fig.leakage);
    phase.push(fig.phase);
    mean += w * fig.infidelity;
    const { dI, dQ } = driveDerivatives(d, member);
    for (let k = 0; k < n; k++) {
      const h = ladderHamiltonian(d, pulse.i[k], pulse.q[k], member, system);
      // dU/dc = U_N ... U_{k+1} dU_k U_{k-1} ... U_1 (the free phase is optimal: its own change adds nothing)
      gradI[k] += w * fig.slope(mul(after[k + 1], mul(segmentDerivative(h, dI, pulse.dt), before[k])));
      gradQ[k] += w * fig.slope(mul(after[k + 1], mul(segmentDerivative(h, dQ, pulse.dt), before[k])));
    }
  }
  return { mean, perMember, leakage, phase, gradI, gradQ };
}
