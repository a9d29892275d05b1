export { COMMAND_NAMES, loadCommand, main } from './main';
export { Runtime } from './runtime';
export { runCommand } from './command';
export { runDemo, type DemoResult } from './demo-pipeline';
export { demoChangeTable, demoTable, readPlantedChange } from './commands/demo';
export { OWN_FOLDER_MARKER } from './own-folder';
export { command as tokenCommand } from './commands/token';
export { command as exportCommand } from './commands/export';
