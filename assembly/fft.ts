// A complex fast Fourier transform of power-of-two size, in place on interleaved
// (re, im) f64 values: the iterative radix-2 decimation-in-time algorithm (Cooley &
// Tukey, Math. Comp. 19, 297, 1965), bit-reversed input order, butterflies by stage.
// The twiddle factors come from a table filled once per size (fftTwiddles), so the
// transform itself calls no sine or cosine. Used by the line's drive map (line.ts) above
// the direct sum's crossover.

@inline function at(ptr: usize, k: i32): usize { return ptr + (<usize>k << 3); }

/** Fill tw with cos(2 pi k/size), -sin(2 pi k/size) for k < size/2 (size/2 pairs, size f64). */
export function fftTwiddles(tw: usize, size: i32): void {
  const step = 2.0 * Math.PI / <f64>size;
  for (let k = 0; k < size >> 1; k++) {
    store<f64>(at(tw, 2 * k), Math.cos(step * <f64>k));
    store<f64>(at(tw, 2 * k + 1), -Math.sin(step * <f64>k));
  }
}

/** In-place transform of `size` complex values at data: forward (e^{-i...}) or, with inverse, unscaled backward. */
export function fft(data: usize, size: i32, tw: usize, inverse: bool): void {
  // Bit-reversal permutation.
  let j = 0;
  for (let i = 0; i < size - 1; i++) {
    if (i < j) {
      const ar = load<f64>(at(data, 2 * i)), ai = load<f64>(at(data, 2 * i + 1));
      store<f64>(at(data, 2 * i), load<f64>(at(data, 2 * j)));
      store<f64>(at(data, 2 * i + 1), load<f64>(at(data, 2 * j + 1)));
      store<f64>(at(data, 2 * j), ar);
      store<f64>(at(data, 2 * j + 1), ai);
    }
    let bit = size >> 1;
    while (j & bit) { j ^= bit; bit >>= 1; }
    j |= bit;
  }
  const sign: f64 = inverse ? -1.0 : 1.0;
  for (let len = 2; len <= size; len <<= 1) {
    const half = len >> 1;
    const stride = size / len;
    for (let start = 0; start < size; start += len) {
      for (let k = 0; k < half; k++) {
        const wr = load<f64>(at(tw, 2 * k * stride));
        const wi = sign * load<f64>(at(tw, 2 * k * stride + 1));
        const a = start + k, b = a + half;
        const br = load<f64>(at(data, 2 * b)), bi = load<f64>(at(data, 2 * b + 1));
        const tr = br * wr - bi * wi, ti = br * wi + bi * wr;
        const ar = load<f64>(at(data, 2 * a)), ai = load<f64>(at(data, 2 * a + 1));
        store<f64>(at(data, 2 * a), ar + tr);
        store<f64>(at(data, 2 * a + 1), ai + ti);
        store<f64>(at(data, 2 * b), ar - tr);
        store<f64>(at(data, 2 * b + 1), ai - ti);
      }
    }
  }
}
