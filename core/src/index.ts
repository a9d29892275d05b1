// Public API of @stemwise/core: what more than one service (or the CLI and a service) needs, one home
// each. It sits below the three services and above @stemwise/db and @stemwise/platform; the pure
// science (science/) does no I/O.
export type { ServiceDeps } from './deps';
export type { ServiceDescriptor, ServiceName, StartedService } from './service';
export * from './science/index';
// The plot-metric catalogue (its home is @stemwise/db, whose schema derives from it).
export * from '@stemwise/db/catalogue';
export * from './fits/fit-columns';
export * from './fits/stored-fits';
export * from './fits/left-out';
export * from './fits/chart-data';
export * from './export/table-format';
export * from './export/sink';
export * from './species/species-cache';
export * from './region-summary/types';
export * from './region-summary/variables';
export * from './region-summary/caution-flag';
export * from './region-summary/stand-table';
export * from './intake/rules/rule';
export * from './intake/rules/catalogue';
export * from './intake/rules/structure';
export * from './intake/rules/fields';
export * from './intake/rules/rows';
export * from './intake/rules/cross';
export * from './intake/rules/plausibility';
export * from './intake/storage';
export * from './intake/submit';
export * from './intake/batch-report';
export * from './recompute/recompute';
export * from './recompute/stage-times';
export * from './recompute/height-models';
export * from './recompute/live-run';
export * from './recompute/follow-up';
export * from './recompute/schedules';
export * from './recompute/reconcile';
export * from './recompute/processors';
export * from './recompute/reconciler';
