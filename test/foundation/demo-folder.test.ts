import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runMain } from '../support/cli';

// `stemwise demo --out DIR` never empties a folder it did not make (the full demo run, which writes the
// folder and its marker, is test/e2e/demo.test.ts; the folder rules themselves, cli/src/own-folder.test.ts).

const root = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-demo-folder-'));
afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

const stemwise = runMain;

const bare = { ...process.env, DATABASE_URL: undefined, REDIS_URL: undefined };

describe('stemwise demo --out', () => {
  it("refuses a folder holding a user's file, with one line and exit code 2, and the file stays", async () => {
    const out = path.join(root, 'my-folder');
    fs.mkdirSync(path.join(out, 'notes'), { recursive: true });
    fs.writeFileSync(path.join(out, 'plot-sketch.txt'), 'plot 7: big fig by the stream');
    fs.writeFileSync(path.join(out, 'notes', 'a.txt'), 'a');
    const r = await stemwise(['demo', '--out', out], { ...bare, STEMWISE_DATA_DIR: path.join(root, 'data') });
    expect(r.code).toBe(2);
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^stemwise: .*my-folder is not empty and was not made by stemwise .*nothing was deleted/);
    expect(fs.readFileSync(path.join(out, 'plot-sketch.txt'), 'utf8')).toBe('plot 7: big fig by the stream');
    expect(fs.readdirSync(out).sort()).toEqual(['notes', 'plot-sketch.txt']);
    expect(fs.existsSync(path.join(root, 'data'))).toBe(false); // refused before anything was made
  });

  it("refuses a data folder whose demo/ subfolder holds a user's file", async () => {
    const data = path.join(root, 'shared');
    fs.mkdirSync(path.join(data, 'demo'), { recursive: true });
    fs.writeFileSync(path.join(data, 'demo', 'slides.pdf'), 'mine');
    const r = await stemwise(['demo', '--out', path.join(root, 'new-report')], { ...bare, STEMWISE_DATA_DIR: data });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/demo is not empty and was not made by stemwise/);
    expect(fs.readdirSync(path.join(data, 'demo'))).toEqual(['slides.pdf']);
  });
});
