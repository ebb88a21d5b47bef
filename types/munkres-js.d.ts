declare module 'munkres-js' {
  /** Kuhn-Munkres (Hungarian method): the `[row, column]` pairs of a minimum-cost assignment of a square or rectangular matrix. */
  function computeMunkres(costMatrix: number[][], options?: { padValue?: number }): Array<[number, number]>;
  export = computeMunkres;
}
