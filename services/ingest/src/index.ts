export { createProcessors, processBatch } from './processors';
export { importSpeciesFile, type SpeciesImportResult } from './species-import';
export { ingestEvents, type IngestProgress } from './progress';
export { formatBatchReport, formatBytes, progressBars, progressLine } from './report-text';
