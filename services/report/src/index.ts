export { createProcessors } from './processors';
export { buildServer, startReportServer, type ReportServerOptions } from './server';
export { writeRegionPages } from './static-pages';
export { exportRegions, listRegionExportRows, type ExportRegionsOptions } from './export-regions';
export { assembleRegionSnapshot, refreshStaleSummaries } from './snapshots';
export { newToken, hashToken, TOKEN_ROLES, type Principal } from './access';
export { SummaryResponse } from './routes/schemas';
export type { SnapshotPayload } from './snapshot-payload';
export { service } from './service';
