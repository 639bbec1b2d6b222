declare module 'wav-decoder' {
  interface AudioData {
    sampleRate: number;
    channelData: Float32Array[];
  }
  function decode(src: ArrayBuffer | Uint8Array, opts?: { symmetric?: boolean }): Promise<AudioData>;
  namespace decode {
    function sync(src: ArrayBuffer | Uint8Array, opts?: { symmetric?: boolean }): AudioData;
  }
  const _default: { decode: typeof decode };
  export default _default;
  export { decode };
}

declare module 'fft.js' {
  export default class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    toComplexArray(input: ArrayLike<number>, storage?: number[]): number[];
    fromComplexArray(complex: ArrayLike<number>, storage?: number[]): number[];
    completeSpectrum(spectrum: number[]): void;
    transform(out: number[] | Float64Array, data: ArrayLike<number>): void;
    realTransform(out: number[] | Float64Array, data: ArrayLike<number>): void;
    inverseTransform(out: number[] | Float64Array, data: ArrayLike<number>): void;
  }
}

declare module 'write-file-atomic' {
  function writeFileAtomic(filename: string, data: string | Uint8Array, options?: { mode?: number; encoding?: string; fsync?: boolean }): Promise<void>;
  export default writeFileAtomic;
}
