// fft.js ships no types. This declares the part of its API heatcheck uses.
declare module "fft.js" {
  type NumericArray = { length: number; [index: number]: number };
  export default class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    /** Forward transform of a real input; fills out[0 .. size+1] (bins 0..size/2, interleaved re, im). */
    realTransform(out: NumericArray, data: NumericArray): void;
    completeSpectrum(spectrum: NumericArray): void;
    transform(out: NumericArray, data: NumericArray): void;
    inverseTransform(out: NumericArray, data: NumericArray): void;
  }
}
