// Same scene and seed give the same bytes: every demo scene's ions.arrow, history.arrow and
// trajectories.arrow against the SHA-256 digests in demo-bytes.json. First recorded with the tree
// before the stage-registry refactor (commit b7708be, Node 20.20.2, x86-64); re-recorded for issue
// 11 (fates missed and returned, the detector, the entry_rf_phase column), so a refactor that
// changes no result keeps this test green; a change that alters results on purpose
// re-records them (IONTRAIL_GOLDEN_RECORD=1 npx vitest run test/golden) and says why in its commit.
// Workers: 1 here while the digests came from 2, so this also checks worker-count independence.
import { describe, it, expect, afterAll } from 'vitest';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { CLI, ROOT, tempDir } from '../helpers/cli.js';
import { parseScene } from '../../sim/scene/load.js';
import { trackingRefusal } from '../../sim/stages/registry.js';

const MANIFEST = join(ROOT, 'test/golden/demo-bytes.json');
const FILES = ['ions.arrow', 'history.arrow', 'trajectories.arrow'];
const record = process.env.IONTRAIL_GOLDEN_RECORD === '1';
const cli = process.env.IONTRAIL_GOLDEN_CLI ?? CLI;
const workers = record ? '2' : '1';

const all = readdirSync(join(ROOT, 'scenes')).filter((f) => f.endsWith('.yaml')).sort();
// Scenes with a stage ions cannot be tracked through yet (electrode fields, solved by `iontrail
// field`) have no run bytes: the kind says so, and `run` must refuse them whole.
const untracked = all.filter((f) => trackingRefusal(parseScene(readFileSync(join(ROOT, 'scenes', f), 'utf8'), f).stages) !== undefined);
const scenes = all.filter((f) => !untracked.includes(f));
const tmp = tempDir('iontrail-golden-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function digests(scene: string): Record<string, string> {
  const out = join(tmp, scene.replace(/\.yaml$/, ''));
  // Scenes with solved electrode fields solve them into a field cache of this test's own.
  const env = { ...process.env, XDG_CACHE_HOME: join(tmp, 'field-cache') };
  const r = spawnSync(process.execPath, [cli, 'run', join('scenes', scene), '-o', out, '--workers', workers], { cwd: ROOT, encoding: 'utf8', env });
  if (r.status !== 0) throw new Error(`iontrail run scenes/${scene}: exit ${r.status}: ${r.stderr}`);
  const d: Record<string, string> = {};
  for (const f of FILES) {
    const p = join(out, f);
    if (existsSync(p)) d[f] = createHash('sha256').update(readFileSync(p)).digest('hex');
  }
  return d;
}

describe('demo scenes give the recorded bytes', () => {
  if (record) {
    it('records the digests', () => {
      const all: Record<string, Record<string, string>> = {};
      for (const s of scenes) all[s] = digests(s);
      writeFileSync(MANIFEST, JSON.stringify({ recorded_with: 'iontrail run --workers 2; the commit that re-recorded it says why', scenes: all }, null, 2) + '\n');
      expect(Object.keys(all).length).toBe(scenes.length);
    }, 300_000);
    return;
  }
  const manifest = JSON.parse(readFileSync(MANIFEST, 'utf8')) as { scenes: Record<string, Record<string, string>> };
  it('has a digest for every demo scene', () => {
    expect(Object.keys(manifest.scenes).sort()).toEqual(scenes);
  });
  for (const s of scenes) {
    it(`scenes/${s}`, () => {
      const want = manifest.scenes[s];
      expect(Object.keys(want).length).toBeGreaterThan(0);
      expect(digests(s)).toEqual(want);
    }, 180_000);
  }
});

// Every demo scene is tracked today; this stays for a stage kind that can be mapped before it can be tracked.
describe.skipIf(untracked.length === 0)('demo scenes that cannot be tracked yet', () => {
  for (const s of untracked) {
    it(`scenes/${s}: run refuses in one line, exit 2, nothing written`, () => {
      const out = join(tmp, `refused-${s.replace(/\.yaml$/, '')}`);
      const r = spawnSync(process.execPath, [cli, 'run', join('scenes', s), '-o', out], { cwd: ROOT, encoding: 'utf8' });
      expect(r.status).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(/can be solved and mapped with `iontrail field`; tracking ions through it is not available yet/);
      expect(existsSync(out)).toBe(false);
    });
  }
});

