/** exifr's small build (JPEG and TIFF segments only): the same `parse` as the full package. */
declare module 'exifr/dist/mini.esm.mjs' {
  export { parse } from 'exifr';
}
