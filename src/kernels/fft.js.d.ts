declare module 'fft.js' {
  export default class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    transform(out: ArrayLike<number> & { [i: number]: number }, data: ArrayLike<number>): void;
    inverseTransform(out: ArrayLike<number> & { [i: number]: number }, data: ArrayLike<number>): void;
    /** Real input of `size` values; fills the first half of the interleaved complex output. */
    realTransform(out: ArrayLike<number> & { [i: number]: number }, data: ArrayLike<number>): void;
    /** Fills the second half of a realTransform output from the first (conjugate symmetry). */
    completeSpectrum(spectrum: ArrayLike<number> & { [i: number]: number }): void;
  }
}
