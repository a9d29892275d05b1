export { main } from './main';
export { Runtime } from './runtime';
export { runDemo, type DemoResult } from './demo-pipeline';
export { demoTable } from './commands/demo';
export { run as tokenCommand } from './commands/token';
export { run as exportCommand } from './commands/export';
