// The one place in the core that allocates: a bump arena above the static data.
// JavaScript notes the arena's top at the start of a job, carves every buffer of the job
// from it and releases back to that mark at the end, so the hot loops never allocate,
// memory never fragments, and a short job run while a design waits between iterations
// (a map, an evaluation) nests above the design's buffers without touching them.
//
// Layout of one job (all f64, 16-byte aligned, sizes in elements):
//
//   +--------------------+  __heap_base
//   | I[n]   Q[n]        |  pulse samples, Hz
//   +--------------------+
//   | scale[m]           |  1 + amplitude error of each member      (m padded to a
//   | detuning[m]        |  Hz                                        multiple of 4 with
//   | weight[m]          |  normalised, padding members weigh 0      copies of member 0)
//   +--------------------+
//   | target[8]          |  G = (u, v) then H = (u, v) as re, im pairs: the figure is
//   |                    |  taken of W = G U H (gate: G = V^dag, H = 1; state: G, H rotate
//   |                    |  the poles onto the target and initial states)
//   +--------------------+
//   | perMember[m]       |  infidelity of each member (output)
//   | gradI[n] gradQ[n]  |  d(mean infidelity)/dI_k, /dQ_k (output, gradient jobs)
//   | series[6 n]        |  cos a, S = sin(a)/a, T of each segment for one pair of
//   |                    |  members (three v128 per segment), kept by the forward
//   |                    |  sweep of a gradient for its backward sweep
//   +--------------------+
//   | optimiser state    |  x, g, trial x, trial g, direction, S[M][P], Y[M][P], ...
//   +--------------------+  arena top (grows memory as needed)

let arenaStart: usize = 0;
let arenaTop: usize = 0;

/** Forget every buffer of the previous job. */
export function arenaReset(): void {
  if (arenaStart == 0) arenaStart = (__heap_base + 15) & ~(<usize>15);
  arenaTop = arenaStart;
}

/** A 16-byte aligned block of `bytes` bytes, growing memory when needed; 0 when it cannot. */
export function arenaAlloc(bytes: usize): usize {
  if (arenaStart == 0) arenaReset();
  const ptr = arenaTop;
  const end = (ptr + bytes + 15) & ~(<usize>15);
  const have = (<usize>memory.size()) << 16;
  if (end > have) {
    const pages = <i32>((end - have + 0xffff) >> 16);
    if (memory.grow(pages) < 0) return 0;
  }
  arenaTop = end;
  return ptr;
}

/** Free every block allocated after `used` bytes were in use (jobs nest, last in first out). */
export function arenaRelease(used: usize): void {
  if (arenaStart == 0) arenaReset();
  arenaTop = arenaStart + used;
}

/** Bytes in use by the current job. */
export function arenaUsed(): usize {
  return arenaTop - arenaStart;
}
