/** The one function of wawoff2 the report calls; the package ships no type declarations. */
declare module 'wawoff2/decompress.js' {
  /** A WOFF2 font unpacked to the TrueType it was made from. */
  export default function decompress(woff2: Uint8Array): Promise<Uint8Array>;
}
