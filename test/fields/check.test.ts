// Bad input: each refusal names its key inside the stage and says what is wrong in one line; a solve
// that cannot reach its tolerance says so with the residual reached.
import { describe, expect, it } from 'vitest';
import { checkProblem, estimateMemory, FieldInputError, solveField, type FieldProblem } from '../../sim/fields/index.js';

const mm = 1e-3;
const V = (dc: number) => ({ dc, rf: 0, aux: 0 });

function base(): FieldProblem {
  return {
    grid: { symmetry: 'planar', spacing: 0.05 * mm, halfWidth: 10 * mm, length: 50 * mm, mirror: [], referenceRadius: 2 * mm },
    electrodes: [
      { name: 'a', potential: V(10), shapes: [{ kind: 'circle', center: [5 * mm, 0], radius: 2 * mm }], holes: [] },
      { name: 'b', potential: V(-10), shapes: [{ kind: 'circle', center: [-5 * mm, 0], radius: 2 * mm }], holes: [] },
    ],
  };
}

function refusal(f: () => void): FieldInputError {
  try { f(); } catch (e) { if (e instanceof FieldInputError) return e; throw e; }
  throw new Error('no FieldInputError');
}

describe('checkProblem refuses bad electrode geometry', () => {
  it('accepts a sound problem', () => {
    expect(() => checkProblem(base(), { freeMemoryBytes: 2 ** 34 })).not.toThrow();
  });
  it('overlapping electrodes at different potentials', () => {
    const p = base();
    p.electrodes = [p.electrodes[0], { name: 'b', potential: V(-10), shapes: [{ kind: 'rectangle', min: [-1 * mm, -1 * mm], max: [1 * mm, 1 * mm] }, { kind: 'circle', center: [4 * mm, 0], radius: 2 * mm }], holes: [] }];
    const e = refusal(() => checkProblem(p, { freeMemoryBytes: 2 ** 34 }));
    expect(e.key).toBe('electrodes.1.shapes.1');
    expect(e.message).toMatch(/electrode 'b' overlaps electrode 'a' at \(.* mm, .* mm\) but their potentials differ/);
    // The same overlap at the same potential is a union, not an error.
    p.electrodes[1].potential.dc = 10;
    expect(() => checkProblem(p, { freeMemoryBytes: 2 ** 34 })).not.toThrow();
  });
  it('a shape outside the grid', () => {
    const p = base();
    p.electrodes[1].shapes = [{ kind: 'circle', center: [30 * mm, 0], radius: 2 * mm }];
    const e = refusal(() => checkProblem(p, { freeMemoryBytes: 2 ** 34 }));
    expect(e.key).toBe('electrodes.1.shapes.0');
    expect(e.message).toMatch(/circle of electrode 'b' lies outside the grid/);
  });
  it('a feature narrower than three cells, with the spacing to use', () => {
    const p: FieldProblem = { ...base(), grid: { symmetry: 'axial', spacing: 0.05 * mm, radius: 5 * mm, length: 20 * mm, mirror: [] } };
    p.electrodes = [{ name: 'lens', potential: V(100), shapes: [{ kind: 'tube', innerRadius: 2 * mm, outerRadius: 2.1 * mm, from: 2 * mm, to: 10 * mm }], holes: [] }];
    const e = refusal(() => checkProblem(p, { freeMemoryBytes: 2 ** 34 }));
    expect(e.key).toBe('electrodes.0.shapes.0');
    expect(e.message).toBe("tube wall of electrode 'lens' is 0.1 mm, narrower than three cells of 0.05 mm; use a spacing of at most 0.025 mm");
  });
  it('a grid larger than free memory, with the estimate', () => {
    const p = base();
    const est = estimateMemory(p);
    expect(est).toBeGreaterThan(401 * 401 * 8 * 8); // at least the Krylov vectors of one 401² solve
    const e = refusal(() => checkProblem(p, { freeMemoryBytes: est / 2 }));
    expect(e.key).toBe('grid.spacing');
    expect(e.message).toMatch(/needs about \d+ MiB, more than the \d+ MiB of free memory/);
  });
  it('a spacing that is not a positive length', () => {
    const p = base();
    p.grid = { ...p.grid, spacing: 0 };
    expect(refusal(() => checkProblem(p)).key).toBe('grid.spacing');
  });
});

describe('solveField reports a solve that does not converge', () => {
  it('throws with the residual and iterations', async () => {
    const p = base();
    p.grid = { ...p.grid, spacing: 0.25 * mm };
    await expect(solveField(p, { workers: 1, maxIterations: 1, tolerance: 1e-15 })).rejects.toThrow(/did not converge: relative residual \d\.\d\de-\d+ after 1 iterations/);
  });
});
