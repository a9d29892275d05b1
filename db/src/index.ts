export * from './connection';
export * as schema from './schema/index';
export * from './queries/forest-types';
export * from './queries/recompute';
export type { ServiceDeps } from './deps';
