// svgdom ships no type declarations; only the factory the renderer uses is declared here.
declare module 'svgdom' {
  /** A fresh window whose document is an empty <svg> root. */
  export function createSVGWindow(): Window & { document: Document };
}
