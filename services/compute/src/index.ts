export { createProcessors } from './processors';
export { computePlotChunk, type ChunkCounts } from './plot-chunk';
export { speciesStems } from './chunk-metrics';
export { storeFits, refreshStaleFits, fitForestType, MIN_REGION_PLOTS, type FitSettings } from './fits';
export { exportPlots, plotExportItems, PLOT_EXPORT_COLUMNS, PLOT_EXPORT_FORMATS, type PlotExportFormat, type ExportSummary } from './export/plots';
export { exportChange, changeExportItems, CHANGE_EXPORT_COLUMNS } from './export/change';
export { exportFits, FIT_EXPORT_FORMATS, type FitExportFormat } from './export/fits';
export { service } from './service';
export { metricsPool, closeMetricsPool } from './metrics-pool';
