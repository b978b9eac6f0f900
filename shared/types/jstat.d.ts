// Minimal typing for the parts of jstat 1.9 that Halocline uses (the package ships no types).
declare module 'jstat' {
  interface ContinuousDistribution<P extends unknown[]> {
    pdf(x: number, ...params: P): number
    cdf(x: number, ...params: P): number
    inv(p: number, ...params: P): number
  }
  interface JStatStatic {
    studentt: ContinuousDistribution<[dof: number]>
    normal: ContinuousDistribution<[mean: number, sd: number]>
    centralF: ContinuousDistribution<[df1: number, df2: number]>
    chisquare: ContinuousDistribution<[dof: number]>
    /** Regularised incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number
  }
  const jStat: JStatStatic
  export default jStat
  export { jStat }
}
