// FFT instances from fili, one per radix, built once: each holds sine/cosine tables whose construction costs more
// than a transform, and the rolling driver asks for thousands of transforms of the same few sizes. The cache holds
// only these constant tables (and fili's scratch buffers, which every call overwrites), so results never depend on
// what ran before.
import Fili, { type FftInstance } from "fili";

const instances = new Map<number, FftInstance>();

/** A fili FFT of length `radix` (a power of two). Its `forward` returns views of internal buffers: copy them. */
export function fftOfSize(radix: number): FftInstance {
  let fft = instances.get(radix);
  if (!fft) {
    if (!(Number.isInteger(radix) && radix >= 2 && (radix & (radix - 1)) === 0)) {
      throw new RangeError(`FFT length must be a power of two ≥ 2, got ${radix}`);
    }
    fft = new Fili.Fft(radix);
    instances.set(radix, fft);
  }
  return fft;
}
