export { createProcessors } from './processors';
export { buildServer, startReportServer, type ReportServerOptions } from './server';
export { writeRegionPages } from './static-pages';
export { exportRegions, listRegionExportRows, type ExportRegionsOptions } from './export-regions';
export { assembleRegionSnapshot, refreshStaleSummaries } from './snapshots';
export { newToken, hashToken, TOKEN_ROLES, TokenVerifier, type Principal } from './access';
export { AuditWriter } from './audit';
