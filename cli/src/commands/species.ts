import fs from 'node:fs';
import { importSpeciesFile } from '@stemwise/ingest';
import { StemwiseError } from '@stemwise/platform';
import { defineCommand, usageError, type CommandGroup } from '../command';
import { printErr, printOut } from '../output';
import { delimiterOption } from '../delimiter-option';

const importCommand = defineCommand({
  summary: 'loads a species reference list as a new version',
  usage: `usage: stemwise species import FILE [--delimiter ';'] [--decimal-comma]

FILE is species.csv (name, family, guild, wood_density, synonyms), maybe .gz. It becomes a new
reference version and every plot visit is marked for recomputation; an identical list changes nothing.
`,
  options: {
    delimiter: { type: 'string' },
    'decimal-comma': { type: 'boolean', default: false },
  },
  positionals: true,
  async run({ values, positionals }, rt) {
    const [file, ...rest] = positionals;
    if (!file || rest.length) throw usageError('species import', 'takes one FILE');
    if (!fs.existsSync(file) || !fs.statSync(file).isFile()) throw new StemwiseError('usage', `${file} is not a file`);
    const d = values.delimiter;
    if (d !== undefined && d !== ',' && d !== ';') throw new StemwiseError('usage', `--delimiter takes ',' or ';', not ${JSON.stringify(d)}`);
    if (values['decimal-comma'] && d !== ';') throw new StemwiseError('usage', "--decimal-comma needs --delimiter ';'");
    const result = await importSpeciesFile(await rt.db(), file, { delimiter: d as ',' | ';' | undefined, decimalComma: values['decimal-comma'] });
    const issues = result.log.rows();
    for (const i of issues) printErr(`${i.severity} ${i.rule} ${i.file}${i.line === null ? '' : `:${i.line}`}  ${i.message}\n`);
    if (result.versionId === null) {
      printErr(`stemwise: nothing imported: ${result.errors} error${result.errors === 1 ? '' : 's'} in ${file}\n`);
      return 1;
    }
    printOut(
      result.created
        ? `species reference version ${result.versionId}: ${result.species} species; ${result.staleVisits} plot visits marked for recomputation\n`
        : `species reference unchanged: ${file} equals the current version ${result.versionId}\n`,
    );
    return 0;
  },
});

export const command: CommandGroup = {
  usage: `usage: stemwise species import FILE [--delimiter ';'] [--decimal-comma]

  import    ${importCommand.summary}
`,
  subcommands: { import: importCommand },
};
