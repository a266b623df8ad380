/** The part of jStat (jstat on npm, tests only: an outside reference for src/model/group-stats.ts) the tests use. */
declare module 'jstat' {
  const jstat: {
    readonly jStat: {
      readonly studentt: {
        /** Quantile of Student's t with df degrees of freedom. */
        inv(p: number, df: number): number;
        /** Distribution function of Student's t with df degrees of freedom. */
        cdf(x: number, df: number): number;
      };
    };
  };
  export default jstat;
}
