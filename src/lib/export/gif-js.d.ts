// Types for the part of gif.js 0.2.0 the GIF export uses (the package ships none): its typed NeuQuant quantiser.
declare module 'gif.js/src/TypedNeuQuant.js' {
  /** NeuQuant over RGB bytes; `sampleFactor` 1 (every pixel) … 30. */
  export default class NeuQuant {
    constructor(rgb: Uint8Array, sampleFactor: number);
    buildColormap(): void;
    /** [r, g, b, …] of the 256 palette entries, in index order. */
    getColormap(): number[];
    /** Palette index of the entry nearest a colour. */
    lookupRGB(r: number, g: number, b: number): number;
  }
}
