declare module 'jstat' {
  /** The part of jStat the tests use: the binomial distribution (k successes in n trials of probability p). */
  export const jStat: {
    binomial: {
      pdf(k: number, n: number, p: number): number;
      cdf(k: number, n: number, p: number): number;
    };
  };
}
