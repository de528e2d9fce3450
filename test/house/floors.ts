// The floors of the house: each source file's floor, lowest first. A file may import from its own
// floor or below; the checks in layering.test.ts allow at most one import that runs up a floor.
// (The picture: DESIGN.md data flow — ground-floor types and numerics, physics models, stage kinds,
// loader and engine, figures of merit and sweeps, whole runs, review data, then renderer and CLI.)

export const FLOORS: readonly { floor: number; name: string; paths: readonly string[] }[] = [
  { floor: 0, name: 'ground: core types, units, random streams, integrators, Mathieu', paths: ['sim/core/', 'sim/units/', 'sim/random/', 'sim/integrate/', 'sim/mathieu/', 'sim/version.ts'] },
  { floor: 1, name: 'physics models and file formats', paths: ['sim/fields/', 'sim/gas/', 'sim/spacecharge/', 'sim/runfolder/', 'sim/scene/schema.ts', 'sim/scene/gas.ts'] },
  { floor: 2, name: 'stage kinds', paths: ['sim/stages/', 'sim/scene/fields.ts'] },
  { floor: 3, name: 'loader, engine and the linear fast path beside it', paths: ['sim/scene/', 'sim/engine/', 'sim/fastpath/'] },
  { floor: 4, name: 'figures of merit', paths: ['sim/analysis/'] },
  { floor: 5, name: 'whole runs and their summaries', paths: ['sim/runs/'] },
  { floor: 6, name: 'sweeps: plan, run a point range, reduce', paths: ['sim/sweeps/'] },
  { floor: 7, name: 'review data', paths: ['sim/report/'] },
  { floor: 8, name: 'renderer', paths: ['render/'] },
  { floor: 9, name: 'command line', paths: ['cli/'] },
];

/** Floor of a repository-relative path (the most specific prefix wins), or undefined. */
export function floorOf(path: string): number | undefined {
  let best: { len: number; floor: number } | undefined;
  for (const f of FLOORS) for (const p of f.paths) {
    if (path.startsWith(p) && (best === undefined || p.length > best.len)) best = { len: p.length, floor: f.floor };
  }
  return best?.floor;
}
