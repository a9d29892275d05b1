// `npm run bench [-- --only validate,ingest,compute,report] [-- --big]`: runs each stage's benchmark in its own
// process (so each one's peak memory is its own) against the PostgreSQL of DATABASE_URL or 127.0.0.1,
// and prints their figures. Speed targets are measured here, never in the test suite.
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2);
const onlyAt = args.indexOf('--only');
const only = onlyAt >= 0 ? args[onlyAt + 1].split(',') : ['validate', 'ingest', 'compute', 'report'];
const passThrough = args.filter((a, i) => a !== '--only' && !(onlyAt >= 0 && i === onlyAt + 1));

let failed = 0;
for (const stage of only) {
  console.log(`\n=== bench: ${stage} ===`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', path.join(here, `bench-${stage}.ts`), ...passThrough], { stdio: 'inherit' });
  if (r.status !== 0) {
    console.log(`bench ${stage} exited with ${r.status}`);
    failed++;
  }
}
process.exitCode = failed ? 1 : 0;
