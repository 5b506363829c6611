/**
 * Types of fft.js 4.0.4's FFT as quiver uses it (the package's own
 * declarations are `any` throughout): complex transforms of a power-of-two
 * size on interleaved re/im arrays.
 */
export default class FFT {
  /** A plan of `size` complex points (a power of two, at least 2). */
  constructor(size: number);
  /** Complex points per transform. */
  readonly size: number;
  /** Forward complex transform of `data` into `out` (interleaved re, im). */
  transform(out: Float64Array, data: Float64Array): void;
  /** Inverse complex transform (scaled by 1/size) of `data` into `out`. */
  inverseTransform(out: Float64Array, data: Float64Array): void;
}
