declare module 'fft.js' {
  export default class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    transform(out: ArrayLike<number> & { [i: number]: number }, data: ArrayLike<number>): void;
    inverseTransform(out: ArrayLike<number> & { [i: number]: number }, data: ArrayLike<number>): void;
  }
}
