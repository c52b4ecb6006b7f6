// jstat publishes no type declarations; Cairn uses only a few of its functions through lib/stats.
declare module "jstat" {
  export const jStat: any;
  const _default: { jStat: any } & Record<string, any>;
  export default _default;
}
