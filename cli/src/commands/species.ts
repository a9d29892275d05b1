import fs from 'node:fs';
import { parseArgs } from 'node:util';
import { StemwiseError } from '@stemwise/platform';
import { importSpeciesFile } from '@stemwise/ingest';
import { delimiterOption } from '../delimiter-option';
import type { Runtime } from '../runtime';

export const summary = 'loads the species reference list: species import FILE (a new version)';

const HELP = `usage: stemwise species import FILE [--delimiter ';'] [--decimal-comma]

FILE is species.csv (name, family, guild, wood_density, synonyms), maybe .gz. It becomes a new
reference version and every plot visit is marked for recomputation; an identical list changes nothing.
`;

export async function run(args: string[], rt: Runtime): Promise<number> {
  const { values, positionals } = parseArgs({
    args,
    allowPositionals: true,
    options: {
      delimiter: { type: 'string' },
      'decimal-comma': { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const [sub, file, ...rest] = positionals;
  if (sub !== 'import' || !file || rest.length) throw new StemwiseError('usage', `expected: species import FILE\n${HELP}`);
  if (!fs.existsSync(file) || !fs.statSync(file).isFile()) throw new StemwiseError('usage', `${file} is not a file`);
  const d = delimiterOption(values.delimiter);
  if (values['decimal-comma'] && d !== ';') throw new StemwiseError('usage', "--decimal-comma needs --delimiter ';'");
  const result = await importSpeciesFile(await rt.db(), file, { delimiter: d, decimalComma: values['decimal-comma'] });
  const issues = result.log.rows();
  for (const i of issues) process.stderr.write(`${i.severity} ${i.rule} ${i.file}${i.line === null ? '' : `:${i.line}`}  ${i.message}\n`);
  if (result.versionId === null) {
    process.stderr.write(`stemwise: nothing imported: ${result.errors} error${result.errors === 1 ? '' : 's'} in ${file}\n`);
    return 1;
  }
  process.stdout.write(
    result.created
      ? `species reference version ${result.versionId}: ${result.species} species; ${result.staleVisits} plot visits marked for recomputation\n`
      : `species reference unchanged: ${file} equals the current version ${result.versionId}\n`,
  );
  return 0;
}
