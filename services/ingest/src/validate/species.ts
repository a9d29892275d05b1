import crypto from 'node:crypto';
import type { SpeciesRow } from '@stemwise/db';
import { CROSS, crossMessages, FIELD, normaliseName } from '@stemwise/core';
import { tableReaders, SPECIES_COLUMNS } from '../rules/columns';
import { readTable, type TableSource, type TableStats } from '../read/table';
import { tableOptions, type ValidationContext } from './context';

export interface SpeciesResult {
  rows: SpeciesRow[];
  stats: TableStats;
  /** SHA-256 of the loadable rows in a canonical form: an identical list makes no new version. */
  contentHash: string;
}

const NAME_FORM = /^\S+ \S+/;
const { cell, value } = tableReaders(SPECIES_COLUMNS);

/** Reads species.csv: field rules, `Genus epithet` names, duplicate names, conflicting synonyms. */
export async function validateSpecies(ctx: ValidationContext, src: TableSource): Promise<SpeciesResult> {
  const { log } = ctx;
  const stats: TableStats = { rows: 0, badRows: 0, fatal: false };
  const rows: Array<SpeciesRow & { line: number }> = [];
  const names = new Map<string, number>();
  const read = readTable(src, tableOptions(ctx, SPECIES_COLUMNS, false), stats);
  for await (const batch of read) {
    for (const { values, line, ok: fieldsOk } of batch) {
      ctx.progress.rowsChecked++;
      let ok = fieldsOk;
      const bad = () => {
        if (ok) stats.badRows++;
        ok = false;
      };
      const rawName = cell.name(values);
      if (typeof rawName !== 'string') continue;
      const name = rawName.replace(/\s+/g, ' ');
      if (!NAME_FORM.test(name)) {
        log.add(FIELD.speciesNameForm, src.file, line, 'name', name, `name ${JSON.stringify(name)} must be an accepted scientific name written "Genus epithet"`);
        bad();
      }
      const first = names.get(name);
      if (first !== undefined) {
        log.add(CROSS.duplicateSpecies, src.file, line, 'name', name, crossMessages.duplicateSpecies(name, first));
        bad();
        continue;
      }
      names.set(name, line);
      if (!ok) continue;
      const synonyms = value.synonyms(values);
      const syns = synonyms !== null ? [...new Set(synonyms.split(';').map((x) => x.trim().replace(/\s+/g, ' ')).filter((x) => x !== '' && x !== name))] : [];
      rows.push({
        name,
        genus: normaliseName(name).split(' ')[0],
        family: value.family(values),
        guild: value.guild(values),
        woodDensity: value.wood_density(values),
        synonyms: syns,
        line,
      });
    }
    ctx.tick();
  }
  // Synonyms: each names one species, and none is an accepted name (the resolver needs both).
  const claimedBy = new Map<string, string>();
  const kept: SpeciesRow[] = [];
  for (const r of rows) {
    let ok = true;
    for (const s of r.synonyms) {
      if (names.has(s)) {
        log.add(CROSS.synonymConflict, src.file, r.line, 'synonyms', s, crossMessages.synonymConflict(s, `of ${r.name} is itself an accepted name in this list`));
        ok = false;
      } else if (claimedBy.has(s) && claimedBy.get(s) !== r.name) {
        log.add(CROSS.synonymConflict, src.file, r.line, 'synonyms', s, crossMessages.synonymConflict(s, `is claimed by both ${claimedBy.get(s)} and ${r.name}`));
        ok = false;
      } else claimedBy.set(s, r.name);
    }
    if (ok) kept.push({ name: r.name, genus: r.genus, family: r.family, guild: r.guild, woodDensity: r.woodDensity, synonyms: r.synonyms });
    else stats.badRows++;
  }
  const canonical = kept
    .map((r) => [r.name, r.family, r.guild, r.woodDensity ?? '', [...r.synonyms].sort().join(';')].join('\t'))
    .sort()
    .join('\n');
  return { rows: kept, stats, contentHash: crypto.createHash('sha256').update(canonical).digest('hex') };
}
