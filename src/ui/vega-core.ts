/**
 * The part of vega the components' charts use (./plot.ts): the parser, the view, and the transforms
 * that specs of marks, scales, axes and legends compile to (vega-transforms, vega-view-transforms,
 * vega-encode), registered as the `vega` package registers all of its transforms. Left out: the
 * geographic, hierarchy, force, label, regression, Voronoi, word-cloud and cross-filter transforms
 * (with them the plotting chunk of the embed is 191 kB gzip, without them 148 kB); a spec needing one
 * fails at parse with vega's own message (an unknown transform type), not silently.
 *
 * Deliberately not here: any chart (plot.ts). Cost: none at import beyond registering the transforms.
 */
import { extend } from 'vega-util';
import { transforms } from 'vega-dataflow';
import * as dataTransforms from 'vega-transforms';
import * as viewTransforms from 'vega-view-transforms';
import * as encodeTransforms from 'vega-encode';

extend(transforms, dataTransforms, viewTransforms, encodeTransforms);

export { parse } from 'vega-parser';
export { View } from 'vega-view';
