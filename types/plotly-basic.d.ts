// plotly.js-basic-dist-min publishes no type declarations; it is the same API as plotly.js
// (scatter, bar and pie traces only), so it takes plotly.js's types (@types/plotly.js).
declare module "plotly.js-basic-dist-min" {
  import * as Plotly from "plotly.js";
  export = Plotly;
}
