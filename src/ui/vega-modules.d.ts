// Typings for the vega packages src/ui/vega-core.ts imports directly (they ship no typings of their own;
// the `vega` package's typings describe the same parse and View).
declare module 'vega-parser' {
  export { parse } from 'vega';
}
declare module 'vega-view' {
  export { View } from 'vega';
}
declare module 'vega-dataflow' {
  export const transforms: Record<string, unknown>;
}
declare module 'vega-transforms';
declare module 'vega-view-transforms';
declare module 'vega-encode';
