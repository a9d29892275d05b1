export { main } from './main';
export { Runtime } from './runtime';
