/** Type declarations for the `bessel` package (pure JavaScript Bessel functions, CommonJS, no bundled types). */
declare module 'bessel' {
  interface BesselFunctions {
    /** Bessel function of the first kind J_n(x), integer order n ≥ 0. */
    besselj(x: number, n: number): number;
    /** Bessel function of the second kind Y_n(x). */
    bessely(x: number, n: number): number;
    /** Modified Bessel function I_n(x). */
    besseli(x: number, n: number): number;
    /** Modified Bessel function K_n(x). */
    besselk(x: number, n: number): number;
  }
  const bessel: BesselFunctions;
  export default bessel;
}
