export * from './config';
export * from './errors';
export * from './logger';
export * from './queue/index';
export * from './terminal-text';
