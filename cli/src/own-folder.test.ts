import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { checkOwnFolder, claimOwnFolder, OWN_FOLDER_MARKER } from './own-folder';

const roots: string[] = [];
function tmp(): string {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-own-'));
  roots.push(d);
  return d;
}
afterEach(() => roots.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

describe('folders stemwise may empty', () => {
  it('creates a missing folder, and takes an empty one, with its marker', () => {
    const missing = path.join(tmp(), 'report');
    claimOwnFolder(missing);
    expect(fs.readdirSync(missing)).toEqual([OWN_FOLDER_MARKER]);
    const empty = tmp();
    claimOwnFolder(empty);
    expect(fs.readdirSync(empty)).toEqual([OWN_FOLDER_MARKER]);
  });

  it('empties a folder it made before', () => {
    const dir = path.join(tmp(), 'report');
    claimOwnFolder(dir);
    fs.mkdirSync(path.join(dir, 'regions'));
    fs.writeFileSync(path.join(dir, 'regions', 'old.html'), 'old');
    claimOwnFolder(dir);
    expect(fs.readdirSync(dir)).toEqual([OWN_FOLDER_MARKER]);
  });

  it("refuses a folder with someone's files and deletes nothing", () => {
    const dir = tmp();
    fs.writeFileSync(path.join(dir, 'field-notes.txt'), 'mine');
    expect(() => claimOwnFolder(dir)).toThrow(/is not empty and was not made by stemwise.*nothing was deleted/);
    expect(() => checkOwnFolder(dir)).toThrow(expect.objectContaining({ code: 'usage' }));
    expect(fs.readdirSync(dir)).toEqual(['field-notes.txt']);
    const file = path.join(dir, 'field-notes.txt');
    expect(() => claimOwnFolder(file)).toThrow(/is a file, not a folder/);
    expect(fs.readFileSync(file, 'utf8')).toBe('mine');
  });

  it('takes a folder holding only names it writes itself, and nothing beside them', () => {
    const dir = tmp();
    fs.mkdirSync(path.join(dir, 'pgdata'));
    claimOwnFolder(dir, ['pgdata', 'uploads']);
    expect(fs.readdirSync(dir)).toEqual([OWN_FOLDER_MARKER]);
    fs.rmSync(path.join(dir, OWN_FOLDER_MARKER));
    fs.mkdirSync(path.join(dir, 'pgdata'));
    fs.writeFileSync(path.join(dir, 'thesis.docx'), 'mine');
    expect(() => claimOwnFolder(dir, ['pgdata', 'uploads'])).toThrow(/not made by stemwise/);
    expect(fs.readdirSync(dir).sort()).toEqual(['pgdata', 'thesis.docx']);
  });
});
