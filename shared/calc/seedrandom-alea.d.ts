// seedrandom ships no types; the one entry Trimout uses (lib/alea.js: Baagøe's Alea, a CommonJS
// function that takes a seed and returns a generator).
declare module 'seedrandom/lib/alea' {
  interface AleaPrng {
    (): number;
    int32(): number;
    double(): number;
  }
  function alea(seed?: string): AleaPrng;
  export = alea;
}
