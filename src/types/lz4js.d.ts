/** Types of lz4js 0.2.0 (the package ships none): LZ4 frame compression in plain JavaScript. */
declare module 'lz4js' {
  export function compress(src: Uint8Array | number[], maxSize?: number): Uint8Array;
  export function decompress(src: Uint8Array | number[], maxSize?: number): Uint8Array;
}
