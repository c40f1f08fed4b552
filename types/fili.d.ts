// fili ships no type declarations; this covers the part Corvane uses (its radix-2 FFT). CommonJS: default import only.
declare module "fili" {
  export interface FftResult {
    /** Views of the instance's own buffers: copy them before the next call. */
    re: Float64Array;
    im: Float64Array;
  }
  export interface FftInstance {
    /** Forward DFT (X_k = Σ x_n e^(−2πikn/N), numpy's sign convention) of the first `radix` values of `buffer`,
     *  after multiplying by the named window ("none" for no window). */
    forward(buffer: ArrayLike<number>, window: string): FftResult;
    /** Inverse DFT with 1/N scaling; returns the real part only (a view of an internal buffer). */
    inverse(re: ArrayLike<number>, im: ArrayLike<number>): Float64Array;
    windows(): string[];
  }
  const Fili: {
    /** `radix` must be a power of two. */
    Fft: new (radix: number) => FftInstance;
  };
  export default Fili;
}
