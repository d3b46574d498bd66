// The one place in the core that allocates: a bump arena above the static data.
// The core keeps no other state between calls: everything a job or a design needs lives
// in a problem block (problem.ts) reached by a pointer, so two designs, or a design and a
// map, interleave in one instance without touching each other.
//
// Two kinds of allocation share the arena:
//   - a short job (a map chunk, an evaluation) notes the arena's top, carves its blocks
//     and releases back to that mark before it returns to the event loop (arenaAlloc,
//     arenaUsed, arenaRelease: last in, first out);
//   - a design start holds its problem block across awaits (arenaHold). Starts end in any
//     order: arenaDrop marks a held block free, and the top comes down past every free
//     held block at the top, so memory of a start that ends under a live one is reused
//     once the one above ends too.
//
// A problem block (one allocation, 16-byte aligned parts, f64 unless noted):
//
//   p ->  +-------------------------------+
//         | Problem header (problem.ts)   |  system kind and size, sizes, dt, bound, pointers
//         +-------------------------------+
//         | samplesI[n]  samplesQ[n]      |  programmed samples, Hz
//         | driveI[nd]   driveQ[nd]       |  the drive the system sees (absent for the
//         |                               |  identity map: they alias the samples)
//         | members[params * m]           |  per-member parameters, one array each (qubit:
//         |                               |  scale = 1 + amplitude error, detuning Hz);
//         |                               |  m padded with zero-weight copies of member 0
//         | weight[m]                     |  normalised, padding members weigh 0
//         | target[targetValues]          |  qubit: G = (u, v), H = (u, v) as re, im pairs;
//         |                               |  the figure is taken of W = G U H (gate:
//         |                               |  G = V^dag, H = 1; state: G, H rotate the poles
//         |                               |  onto the target and initial states)
//         | perMember[memberValues * m]   |  infidelity of each member, then whatever else the
//         |                               |  system reports per member (output)
//         | gradI[n]  gradQ[n]            |  d(mean)/dI_k, dQ_k of the samples (output)
//         | gradDriveI[nd] gradDriveQ[nd] |  the same for the drive (aliases without a map)
//         | work[workValues]              |  the system's scratch (qubit: cos a, S, T per
//         |                               |  segment for two pairs of members, 12 nd)
//         | driveData[driveValues]        |  parameters of the drive map
//         +-------------------------------+
//         | Lbfgs header (lbfgs.ts)       |  present when the block carries an optimiser
//         | x g xt gt d [nVar]            |
//         | S[mem][nVar]  Y[mem][nVar]    |  correction pairs (a ring)
//         | rho[mem] alpha[mem]           |
//         | box method only (lbfgsb.ts):  |  Gram matrices SS, SY, YY [mem][mem];
//         |                               |  K = M^-1, its LU factors and the reduced
//         |                               |  system [2mem][2mem]; 8 vectors [2mem]
//         |                               |  (pivots, W's column pointers among them);
//         |                               |  breakpoints, Cauchy point [nVar]; heap
//         |                               |  of breakpoints (i32) [nVar]
//         +-------------------------------+

let arenaStart: usize = 0;
let arenaTop: usize = 0;
// The newest held block's header (0: none); headers link to the previous one.
let lastHeld: usize = 0;

const HELD_HEADER: usize = 16;

/** Forget every buffer, held or not. */
export function arenaReset(): void {
  if (arenaStart == 0) arenaStart = (__heap_base + 15) & ~(<usize>15);
  arenaTop = arenaStart;
  lastHeld = 0;
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

/**
 * Free every block allocated after `used` bytes were in use (jobs nest, last in first
 * out); never below a live held block, which outlives the job that made it.
 */
export function arenaRelease(used: usize): void {
  if (arenaStart == 0) arenaReset();
  let top = arenaStart + used;
  if (lastHeld != 0 && load<usize>(lastHeld, 4) > top) top = load<usize>(lastHeld, 4);
  arenaTop = top;
}

/** Bytes in use. */
export function arenaUsed(): usize {
  if (arenaStart == 0) arenaReset();
  return arenaTop - arenaStart;
}

/** A block that outlives the current job and is freed by arenaDrop, in any order; 0 when memory is exhausted. */
export function arenaHold(bytes: usize): usize {
  const h = arenaAlloc(bytes + HELD_HEADER);
  if (h == 0) return 0;
  store<usize>(h, lastHeld);            // previous held block
  store<usize>(h, arenaTop, 4);         // end of this block
  store<u32>(h, 1, 8);                  // live
  lastHeld = h;
  return h + HELD_HEADER;
}

/** Free a held block; the arena's top comes down past free held blocks at the top. */
export function arenaDrop(ptr: usize): void {
  store<u32>(ptr - HELD_HEADER, 0, 8);
  while (lastHeld != 0 && load<u32>(lastHeld, 8) == 0 && load<usize>(lastHeld, 4) == arenaTop) {
    arenaTop = lastHeld;
    lastHeld = load<usize>(lastHeld);
  }
}
