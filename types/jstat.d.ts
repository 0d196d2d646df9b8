// jstat ships (CommonJS: import the default export) no type definitions; only the parts Priorsmith uses are declared.
declare module 'jstat' {
  interface ContinuousDist {
    pdf(x: number, ...params: number[]): number
    cdf(x: number, ...params: number[]): number
    inv(p: number, ...params: number[]): number
    mean(...params: number[]): number
    variance(...params: number[]): number
  }
  const jStat: {
    normal: ContinuousDist
    studentt: ContinuousDist
    lognormal: ContinuousDist
    gamma: ContinuousDist
    beta: ContinuousDist
    uniform: ContinuousDist
    chisquare: ContinuousDist
    gammaln(x: number): number
    betaln(a: number, b: number): number
    gammap(a: number, x: number): number
    ibeta(x: number, a: number, b: number): number
    erf(x: number): number
    [key: string]: any
  }
  export default jStat
}
