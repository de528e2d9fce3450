// Whole-or-nothing outputs (sim/core/atomic.ts): the folder swap every output folder goes through
// (run, sweep, report) and the file write of figures and 3D scenes. POSIX rename(2) semantics.
import { describe, it, expect, afterAll } from 'vitest';
import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { folderBeside, swapFolderIntoPlace, writeFileAtomic } from '../../sim/core/atomic.js';
import { tempDir } from '../helpers/cli.js';

const root = tempDir('iontrail-atomic-');
afterAll(() => rmSync(root, { recursive: true, force: true }));

function built(target: string, content: string): string {
  const temp = folderBeside(target);
  writeFileSync(join(temp, 'a.txt'), content);
  return temp;
}

describe('folder swap', () => {
  it('builds beside the target and renames into place when the target is absent', () => {
    const target = join(root, 'fresh');
    const temp = built(target, 'new');
    expect(readdirSync(root)).toContain(temp.slice(root.length + 1));
    expect(swapFolderIntoPlace(temp, target, false)).toBe(true);
    expect(readFileSync(join(target, 'a.txt'), 'utf8')).toBe('new');
    expect(existsSync(temp)).toBe(false);
  });

  it('leaves an existing target and the new folder alone unless asked to replace', () => {
    const dir = join(root, 'keep'), target = join(dir, 'out');
    mkdirSync(target, { recursive: true });
    writeFileSync(join(target, 'old.txt'), 'old');
    const temp = built(target, 'new');
    expect(swapFolderIntoPlace(temp, target, false)).toBe(false);
    expect(readdirSync(target)).toEqual(['old.txt']);
    expect(existsSync(join(temp, 'a.txt'))).toBe(true);
    rmSync(temp, { recursive: true });
  });

  it('replaces an existing target with the complete new folder and leaves nothing beside it', () => {
    const dir = join(root, 'swap'), target = join(dir, 'out');
    mkdirSync(target, { recursive: true });
    writeFileSync(join(target, 'old.txt'), 'old');
    expect(swapFolderIntoPlace(built(target, 'new'), target, true)).toBe(true);
    expect(readdirSync(target)).toEqual(['a.txt']);
    expect(readdirSync(dir)).toEqual(['out']);
  });
});

describe('file write', () => {
  it('replaces the file whole and leaves no temp file', () => {
    const dir = join(root, 'file'), f = join(dir, 'fig.svg');
    mkdirSync(dir);
    writeFileSync(f, 'old');
    writeFileAtomic(f, 'new');
    expect(readFileSync(f, 'utf8')).toBe('new');
    expect(readdirSync(dir)).toEqual(['fig.svg']);
  });

  it('removes its temp file when the write fails', () => {
    const dir = join(root, 'fail');
    mkdirSync(join(dir, 'taken'), { recursive: true }); // a folder where the file should go: rename fails
    expect(() => writeFileAtomic(join(dir, 'taken'), 'x')).toThrow();
    expect(readdirSync(dir)).toEqual(['taken']);
  });
});
