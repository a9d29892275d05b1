// Entry point @stemwise/core/charts: chart specs and their SVG rendering (vega, vega-lite). Its own
// entry point so that a process that draws no chart (an ingest worker) does not load vega.
export * from './render';
export * from './fit-chart';
export * from './means-chart';
export * from './guild-chart';
export type { TopLevelSpec } from 'vega-lite';
export * from './change-chart';
export * from './plot-map';
export * from './diameter-chart';
