// `npm run bench [-- --only validate,ingest,compute,report] [-- --big]`: runs each benchmark in its own
// process (so each one's peak memory is its own) against the PostgreSQL of DATABASE_URL or 127.0.0.1,
// and prints their figures. Speed targets are measured here, never in the test suite.
// Every benchmark is scripts/bench/<topic>.ts; without --only the four pipeline stages run.
// `npm run bench -- --help` lists the topics.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const dir = path.join(path.dirname(fileURLToPath(import.meta.url)), 'bench');
const TOPICS = fs.readdirSync(dir).filter((f) => f.endsWith('.ts')).map((f) => f.slice(0, -3)).sort();
const STAGES = ['validate', 'ingest', 'compute', 'report'];

const args = process.argv.slice(2);
if (args.includes('--help') || args.includes('-h')) {
  console.log(`usage: npm run bench [-- --only TOPIC[,TOPIC…]] [-- options of the topic]\ntopics: ${TOPICS.join(', ')}\nwithout --only: ${STAGES.join(', ')}`);
  process.exit(0);
}
const onlyAt = args.indexOf('--only');
const only = onlyAt >= 0 ? args[onlyAt + 1].split(',') : STAGES;
const unknown = only.filter((t) => !TOPICS.includes(t));
if (unknown.length) {
  console.error(`bench: no topic ${unknown.join(', ')} (topics: ${TOPICS.join(', ')})`);
  process.exit(2);
}
const passThrough = args.filter((a, i) => a !== '--only' && !(onlyAt >= 0 && i === onlyAt + 1));

let failed = 0;
for (const topic of only) {
  console.log(`\n=== bench: ${topic} ===`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', path.join(dir, `${topic}.ts`), ...passThrough], { stdio: 'inherit' });
  if (r.status !== 0) {
    console.log(`bench ${topic} exited with ${r.status}`);
    failed++;
  }
}
process.exitCode = failed ? 1 : 0;
