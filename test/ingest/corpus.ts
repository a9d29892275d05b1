import { gzipSync } from 'node:zlib';
import type { SubmitOptions } from '@stemwise/core';
import { PLOTS, PLOTS_HEADER, SPECIES, STRATA, TREES, TREES_HEADER } from './support';

// The corpus of malformed inputs: each case is a whole upload that must be rejected with nothing
// loaded, and names the rule, file and line the uploader must be told about. Lines count the header
// as line 1. Data are invented (see support.ts).

export interface CorpusCase {
  name: string;
  files: Partial<Record<'plots' | 'trees' | 'strata' | 'species', string | Buffer>>;
  options?: SubmitOptions;
  gzip?: boolean;
  expect: { rule: string; file: string; line: number | null; column?: string };
}

const plotRows = PLOTS.split('\n').slice(1);
const treeRows = TREES.split('\n').slice(1);
const withTree = (i: number, row: string) => [TREES_HEADER, ...treeRows.map((r, k) => (k === i ? row : r))].join('\n');
const withPlot = (i: number, row: string) => [PLOTS_HEADER, ...plotRows.map((r, k) => (k === i ? row : r))].join('\n');
const base = { plots: PLOTS, trees: TREES };
const gz = (s: string) => gzipSync(Buffer.from(`${s}\n`));

export const CORPUS: CorpusCase[] = [
  // structure
  { name: 'empty trees file', files: { ...base, trees: Buffer.alloc(0) }, expect: { rule: 'structure_empty_file', file: 'trees.csv', line: null } },
  { name: 'plots file holding only a BOM and blank lines', files: { ...base, plots: Buffer.from('\ufeff\n\n', 'utf8') }, expect: { rule: 'structure_empty_file', file: 'plots.csv', line: null } },
  { name: 'trees header only', files: { ...base, trees: TREES_HEADER }, expect: { rule: 'structure_no_rows', file: 'trees.csv', line: 2 } },
  {
    name: 'plots without the area_ha column',
    files: { ...base, plots: PLOTS.split('\n').map((l) => l.split(',').filter((_, i) => i !== 5).join(',')).join('\n') },
    expect: { rule: 'structure_missing_column', file: 'plots.csv', line: 1 },
  },
  { name: 'trees with dbh_cm twice', files: { ...base, trees: TREES.split('\n').map((l, i) => `${l},${i === 0 ? 'dbh_cm' : '1'}`).join('\n') }, expect: { rule: 'structure_duplicate_column', file: 'trees.csv', line: 1 } },
  { name: 'a tree row one value short', files: { ...base, trees: withTree(1, 'MW-001,2,Tikka rubra,41.0,,live,,1') }, expect: { rule: 'structure_ragged_row', file: 'trees.csv', line: 3 } },
  { name: 'a tree row one value too many', files: { ...base, trees: withTree(4, 'MW-001,5,Ossara lumen,33.0,,stump,logged,0,0,extra') }, expect: { rule: 'structure_ragged_row', file: 'trees.csv', line: 6 } },
  { name: 'a quoted line break in a species name', files: { ...base, trees: withTree(2, 'MW-001,3,"Ossara\nlumen",12.3,,dead,,0,0') }, expect: { rule: 'structure_quoted_newline', file: 'trees.csv', line: 4 } },
  { name: 'a quote never closed', files: { ...base, trees: `${TREES}\nMW-003,3,"Tikka rubra,20,,live,,0,0` }, expect: { rule: 'structure_bad_quotes', file: 'trees.csv', line: 11 } },
  { name: 'text after a closing quote', files: { ...base, trees: withTree(0, 'MW-001,1,"Ossara lumen"x,24.5,18.2,live,,0,0') }, expect: { rule: 'structure_bad_quotes', file: 'trees.csv', line: 2 } },
  {
    name: 'trees saved as Latin-1',
    files: { ...base, trees: Buffer.from(`${TREES}\nMW-003,3,Tikka ros\u00e9a,20,,live,,0,0\n`, 'latin1') },
    expect: { rule: 'structure_encoding', file: 'trees.csv', line: 11 },
  },
  { name: 'plots saved as UTF-16', files: { ...base, plots: Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(PLOTS, 'utf16le')]) }, expect: { rule: 'structure_encoding', file: 'plots.csv', line: 1 } },
  { name: 'a damaged gzip file', files: { ...base, trees: Buffer.concat([Buffer.from([0x1f, 0x8b, 8, 0]), Buffer.from('not really compressed at all, just bytes')]) }, expect: { rule: 'structure_gzip_corrupt', file: 'trees.csv', line: null } },
  { name: 'a gzip file cut short', files: { ...base, trees: gz(TREES).subarray(0, 60) }, expect: { rule: 'structure_gzip_corrupt', file: 'trees.csv', line: null } },
  { name: 'semicolons without --delimiter', files: { ...base, plots: PLOTS.replace(/,/g, ';') }, expect: { rule: 'structure_semicolon_delimited', file: 'plots.csv', line: 1 } },
  { name: 'a line over 1 MB', files: { ...base, trees: withTree(1, `MW-001,2,${'x'.repeat(1_100_000)},41.0,,live,,1,0`) }, expect: { rule: 'structure_line_too_long', file: 'trees.csv', line: 3 } },
  // fields
  { name: 'a diameter of 0', files: { ...base, trees: withTree(0, 'MW-001,1,Ossara lumen,0,18.2,live,,0,0') }, expect: { rule: 'field_out_of_range', file: 'trees.csv', line: 2 } },
  { name: 'a diameter of 612 cm', files: { ...base, trees: withTree(3, 'MW-001,4,Ossara sp.,612,,live,,0,0') }, expect: { rule: 'field_out_of_range', file: 'trees.csv', line: 5 } },
  { name: 'a diameter that is a word', files: { ...base, trees: withTree(5, 'MW-002,1,Tikka rubra,big,12.0,live,,0,0') }, expect: { rule: 'field_not_number', file: 'trees.csv', line: 7 } },
  { name: 'a decimal comma without the option', files: { ...base, trees: withTree(5, 'MW-002,1,Tikka rubra,"15,1",12.0,live,,0,0') }, expect: { rule: 'field_not_number', file: 'trees.csv', line: 7 } },
  { name: 'a height of 1.2 m', files: { ...base, trees: withTree(0, 'MW-001,1,Ossara lumen,24.5,1.2,live,,0,0') }, expect: { rule: 'field_out_of_range', file: 'trees.csv', line: 2 } },
  { name: 'status alive', files: { ...base, trees: withTree(6, 'MW-002,2,Ossara lumen,62.0,31.5,alive,,0,0') }, expect: { rule: 'field_not_allowed', file: 'trees.csv', line: 8 } },
  { name: 'status missing', files: { ...base, trees: withTree(6, 'MW-002,2,Ossara lumen,62.0,31.5,,,0,0') }, expect: { rule: 'field_required', file: 'trees.csv', line: 8 } },
  { name: 'fire damage 4', files: { ...base, trees: withTree(7, 'MW-003,1,Quill aurea,18.0,,live,,4,0') }, expect: { rule: 'field_not_integer', file: 'trees.csv', line: 9 } },
  { name: 'in_subplot 2', files: { ...base, trees: withTree(8, 'MW-003,2,indet,11.2,,live,,0,2') }, expect: { rule: 'field_not_allowed', file: 'trees.csv', line: 10 } },
  { name: 'a tree id of 65 characters', files: { ...base, trees: withTree(8, `MW-003,${'t'.repeat(65)},indet,11.2,,live,,0,0`) }, expect: { rule: 'field_too_long', file: 'trees.csv', line: 10 } },
  { name: 'the 30th of February', files: { ...base, plots: withPlot(1, 'MW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,2023-02-30,2,0,') }, expect: { rule: 'field_bad_date', file: 'plots.csv', line: 3 } },
  { name: 'a date written day first', files: { ...base, plots: withPlot(1, 'MW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,15/05/2023,2,0,') }, expect: { rule: 'field_bad_date', file: 'plots.csv', line: 3 } },
  { name: 'a survey date in the future', files: { ...base, plots: withPlot(2, 'MW-003,Lowmere,dry,-3.3003,27.6011,0.5,10,0,5,2999-06-02,1,0,180') }, expect: { rule: 'field_date_in_future', file: 'plots.csv', line: 4 } },
  { name: 'a survey date before 1800', files: { ...base, plots: withPlot(2, 'MW-003,Lowmere,dry,-3.3003,27.6011,0.5,10,0,5,1750-06-02,1,0,180') }, expect: { rule: 'field_date_too_early', file: 'plots.csv', line: 4 } },
  { name: 'latitude 95', files: { ...base, plots: withPlot(0, 'MW-001,Upper Tarn,wet,95,27.4410,1,10,0.04,5,2023-05-14,0,1,420') }, expect: { rule: 'field_out_of_range', file: 'plots.csv', line: 2 } },
  { name: 'a plot area of 0', files: { ...base, plots: withPlot(2, 'MW-003,Lowmere,dry,-3.3003,27.6011,0,10,0,5,2023-06-02,1,0,180') }, expect: { rule: 'field_out_of_range', file: 'plots.csv', line: 4 } },
  { name: 'a plot id with a space', files: { ...base, plots: withPlot(2, 'MW 003,Lowmere,dry,-3.3003,27.6011,0.5,10,0,5,2023-06-02,1,0,180') }, expect: { rule: 'field_bad_characters', file: 'plots.csv', line: 4 } },
  { name: 'a region named national (the name of the national rows)', files: { ...base, plots: withPlot(1, 'MW-002,national,wet,-3.1302,27.4522,1,10,0,5,2023-05-15,2,0,') }, expect: { rule: 'field_reserved_region', file: 'plots.csv', line: 3 } },
  { name: 'a stratum of a region named National', files: { ...base, strata: `${STRATA}\n National ,dry,46000` }, expect: { rule: 'field_reserved_region', file: 'strata.csv', line: 5 } },
  { name: 'an unknown forest type', files: { ...base, plots: withPlot(1, 'MW-002,Upper Tarn,swamp,-3.1302,27.4522,1,10,0,5,2023-05-15,2,0,') }, expect: { rule: 'field_unknown_forest_type', file: 'plots.csv', line: 3 } },
  { name: 'logging class missing', files: { ...base, plots: withPlot(1, 'MW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,2023-05-15,,0,') }, expect: { rule: 'field_required', file: 'plots.csv', line: 3 } },
  // A NUL byte passes the UTF-8 check, but PostgreSQL text cannot hold it: a field error, never a load failure.
  { name: 'a NUL byte in a species cell of trees', files: { ...base, trees: withTree(1, 'MW-001,2,Tikka\u0000rubra,41.0,,live,,1,0') }, expect: { rule: 'field_nul_character', file: 'trees.csv', line: 3, column: 'species' } },
  { name: 'a NUL byte in a region cell of plots', files: { ...base, plots: withPlot(2, 'MW-003,Low\u0000mere,dry,-3.3003,27.6011,0.5,10,0,5,2023-06-02,1,0,180') }, expect: { rule: 'field_nul_character', file: 'plots.csv', line: 4, column: 'region' } },
  { name: 'a NUL byte in a forest area of strata', files: { ...base, strata: `${STRATA}\nLowmere,wet,12\u00000` }, expect: { rule: 'field_nul_character', file: 'strata.csv', line: 5, column: 'forest_area_ha' } },
  { name: 'a NUL byte in a quoted family of species', files: { ...base, species: `${SPECIES}\nOssara alba,"Ossara\u0000ceae",pioneer,0.40,` }, expect: { rule: 'field_nul_character', file: 'species.csv', line: 5, column: 'family' } },
  { name: 'fire class 1.5', files: { ...base, plots: withPlot(1, 'MW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,2023-05-15,2,1.5,') }, expect: { rule: 'field_not_integer', file: 'plots.csv', line: 3 } },
  // rows
  { name: 'a stump without a cause', files: { ...base, trees: withTree(4, 'MW-001,5,Ossara lumen,33.0,,stump,,0,0') }, expect: { rule: 'row_stump_cause_missing', file: 'trees.csv', line: 6 } },
  { name: 'a live stem with a stump cause', files: { ...base, trees: withTree(1, 'MW-001,2,Tikka rubra,41.0,,live,natural,1,0') }, expect: { rule: 'row_stump_cause_not_stump', file: 'trees.csv', line: 3 } },
  { name: 'a subplot as large as the plot', files: { ...base, plots: withPlot(0, 'MW-001,Upper Tarn,wet,-3.1201,27.4410,1,10,1,5,2023-05-14,0,1,420') }, expect: { rule: 'row_subplot_area_too_large', file: 'plots.csv', line: 2 } },
  // across rows and files
  { name: 'a plot listed twice', files: { ...base, plots: `${PLOTS}\nMW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,2023-07-15,2,0,` }, expect: { rule: 'cross_duplicate_plot', file: 'plots.csv', line: 5 } },
  { name: 'a tree listed twice in its plot', files: { ...base, trees: `${TREES}\nMW-002,2,Ossara lumen,60.0,,live,,0,0` }, expect: { rule: 'cross_duplicate_tree', file: 'trees.csv', line: 11 } },
  { name: 'a stem of an unknown plot', files: { ...base, trees: `${TREES}\nMW-999,1,Ossara lumen,20.0,,live,,0,0` }, expect: { rule: 'cross_unknown_plot', file: 'trees.csv', line: 11 } },
  { name: 'a subplot stem at the main-plot limit', files: { ...base, trees: withTree(3, 'MW-001,4,Ossara sp.,10,,live,,0,1') }, expect: { rule: 'cross_subplot_stem_too_big', file: 'trees.csv', line: 5 } },
  { name: 'a subplot stem in a plot without subplot', files: { ...base, trees: `${TREES}\nMW-002,3,Ossara lumen,6.0,,live,,0,1` }, expect: { rule: 'cross_subplot_missing', file: 'trees.csv', line: 11 } },
  { name: 'a stratum listed twice', files: { ...base, strata: `${STRATA}\nLowmere,dry,46000` }, expect: { rule: 'cross_duplicate_stratum', file: 'strata.csv', line: 5 } },
  { name: 'a stratum area of 0', files: { ...base, strata: `${STRATA}\nLowmere,wet,0` }, expect: { rule: 'field_out_of_range', file: 'strata.csv', line: 5 } },
  { name: 'a species listed twice', files: { ...base, species: `${SPECIES}\nTikka rubra,Tikkaceae,pioneer,0.40,` }, expect: { rule: 'cross_duplicate_species', file: 'species.csv', line: 5 } },
  { name: 'a synonym that is an accepted name', files: { ...base, species: `${SPECIES}\nOssara alba,Ossaraceae,pioneer,0.40,Tikka rubra` }, expect: { rule: 'cross_synonym_conflict', file: 'species.csv', line: 5 } },
  { name: 'a species name of one word', files: { ...base, species: `${SPECIES}\nOssara,Ossaraceae,pioneer,0.40,` }, expect: { rule: 'field_species_name_form', file: 'species.csv', line: 5 } },
  { name: 'a wood density of 2.1', files: { ...base, species: `${SPECIES}\nOssara alba,Ossaraceae,pioneer,2.1,` }, expect: { rule: 'field_out_of_range', file: 'species.csv', line: 5 } },
  { name: 'an unknown guild, gzipped', gzip: true, files: { ...base, species: `${SPECIES}\nOssara alba,Ossaraceae,climax,0.4,` }, expect: { rule: 'field_not_allowed', file: 'species.csv', line: 5 } },
];
