// Pure science of stemwise (no I/O). One re-export per line, so that modules merge easily.
export * from './allometry';
export * from './disturbance';
export * from './diversity';
export * from './height-diameter';
export * from './log-gamma';
export * from './plot-metrics';
export * from './species-names';
export * from './structure';
export * from './wood-density';
export * from './bootstrap';
export * from './hump';
export * from './hump-bootstrap';
export * from './hump-two-lines';
export * from './random';
export * from './regression';
export * from './student-t';
export * from './verdict';
