#!/usr/bin/env node
// Runs the TypeScript sources directly (tsx), so `npx stemwise …` works right after `npm ci`.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../cli/src/main.ts');
process.exitCode = await main(process.argv.slice(2));
