export { createProcessors, processBatch } from './processors';
export { importSpeciesFile, type SpeciesImportResult } from './species-import';
export { ingestEvents, type IngestProgress } from './progress';
export { formatBatchReport, formatBytes, progressBars, progressLine } from './report-text';
export { PLOT_COLUMNS, TREE_COLUMNS, type ColumnSpec } from './rules/columns';
export { compileFieldCheck, INVALID } from './rules/field-checks';
export { IssueLog } from './issues';
export { service } from './service';
