export * from './connection';
export * as schema from './schema/index';
export * from './queries/forest-types';
