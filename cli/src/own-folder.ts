import fs from 'node:fs';
import path from 'node:path';
import { StemwiseError } from '@stemwise/platform';

/**
 * The file stemwise writes into each folder it makes and may empty on a later run (the demo's report
 * folder and working database). A folder without it is never emptied: it may hold someone's files.
 */
export const OWN_FOLDER_MARKER = '.stemwise-folder';

const MARKER_TEXT = 'stemwise made this folder and empties it when it writes the folder again; files put here are deleted then.\n';

/**
 * Throws (a usage error: exit code 2) unless `dir` is missing, empty, or a folder stemwise made.
 * `knownEntries`: names that only stemwise writes there, so a folder holding nothing else is taken as
 * its own even without the marker (one written before the marker existed).
 */
export function checkOwnFolder(dir: string, knownEntries: readonly string[] = []): void {
  let entries: string[];
  try {
    entries = fs.readdirSync(dir);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return;
    if (code === 'ENOTDIR') throw new StemwiseError('usage', `${dir} is a file, not a folder; nothing was written`);
    throw err;
  }
  if (entries.length && !entries.includes(OWN_FOLDER_MARKER) && !entries.every((e) => knownEntries.includes(e))) {
    throw new StemwiseError('usage', `${dir} is not empty and was not made by stemwise (no ${OWN_FOLDER_MARKER} in it); choose another folder or empty it yourself — nothing was deleted`);
  }
}

/** Makes `dir` an empty folder of stemwise's own: created, or emptied if stemwise made it; refused otherwise. */
export function claimOwnFolder(dir: string, knownEntries: readonly string[] = []): void {
  checkOwnFolder(dir, knownEntries);
  fs.rmSync(dir, { recursive: true, force: true }); // missing, empty, or ours
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(path.join(dir, OWN_FOLDER_MARKER), MARKER_TEXT);
}
