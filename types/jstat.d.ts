// jstat publishes no type declarations; these cover the functions Cairn and its tests call.
declare module "jstat" {
  export interface JStat {
    ibeta(x: number, a: number, b: number): number;
    ibetainv(p: number, a: number, b: number): number;
    beta: { cdf(x: number, a: number, b: number): number; pdf(x: number, a: number, b: number): number; inv(p: number, a: number, b: number): number };
    binomial: { pdf(k: number, n: number, p: number): number; cdf(k: number, n: number, p: number): number };
    normal: { inv(p: number, mean: number, sd: number): number; cdf(x: number, mean: number, sd: number): number };
  }
  export const jStat: JStat;
  const _default: { jStat: JStat };
  export default _default;
}
