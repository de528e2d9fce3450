// Radial density of a cloud held in an RF multipole against the Boltzmann density of its effective
// potential, n(r) ∝ exp(−V*(r)/kT) (D. Gerlich, Adv. Chem. Phys. 82, 1 (1992); V* from the stage
// kind). Ions per unit area in annuli of equal width, for the ions of the chosen fate at the end of
// the run; the curve is normalised to the same number of ions inside the outermost annulus. The
// temperature is the gas's (stage block, else scene block): without gas there is no equilibrium.

import type { FateName, RunFolder } from '../../../sim/runfolder/index.js';
import { kindNamed } from '../../../sim/stages/registry.js';
import { BOLTZMANN } from '../../../sim/units/constants.js';
import type { FigureSpec, LegendEntry } from '../figure.js';
import { PlotError, choiceFlag, intFlag, type KindOptions, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';
import { speciesColors } from '../../common/species.js';

type Raw = Readonly<Record<string, unknown>>;
const FATES = ['alive', 'detected', 'all'] as const;

function build(run: RunFolder, opt: KindOptions): FigureSpec {
  const scene = (run.summary.provenance as { scene?: Raw } | undefined)?.scene;
  const stages = (scene?.stages as Raw[] | undefined) ?? [];
  const I = run.ions;
  const fate = choiceFlag(opt, 'fate', FATES, 'alive');
  const bins = intFlag(opt, 'bins', 20, 5, 200);
  const pops = [...new Set(Array.from(I.population))].sort((a, b) => a - b);
  if (pops.length === 0) throw new PlotError(`${run.dir}: no ions`);
  const row0 = I.population.indexOf(pops[0]);
  const mzOf = (p: number) => I.mz[I.population.indexOf(p)];
  const chargeOf = (p: number) => I.charge[I.population.indexOf(p)] ?? 1;
  const stageIdx = stages.findIndex((s) => kindNamed(s.type)?.effectivePotential?.(s, I.mz[row0], I.charge[row0] ?? 1) !== undefined);
  if (stageIdx < 0) throw new PlotError(`${run.dir}: no stage with an effective potential (an RF-only multipole) in this run`);
  const stage = stages[stageIdx];
  const gas = (stage.gas ?? scene?.gas) as Raw | undefined;
  const T = typeof gas?.temperatureK === 'number' ? gas.temperatureK : undefined;
  if (T === undefined) throw new PlotError(`${run.dir}: the radial density needs a gas temperature (a gas block in the scene)`);
  const kT = BOLTZMANN * T;
  const r0 = kindNamed(stage.type)!.effectivePotential!(stage, I.mz[row0], I.charge[row0] ?? 1)!.r0;
  const byPop = new Map<number, number[]>();
  for (let i = 0; i < I.ion.length; i++) {
    if (fate !== 'all' && I.fate[i] !== (fate as FateName)) continue;
    const r = Math.hypot(I.end_x[i], I.end_y[i]);
    if (!(r < r0)) continue;
    (byPop.get(I.population[i]) ?? byPop.set(I.population[i], []).get(I.population[i])!).push(r);
  }
  const all = [...byPop.values()].flat();
  if (all.length === 0) throw new PlotError(`${run.dir}: no ${fate === 'all' ? '' : fate + ' '}ions inside r0 (try --fate all)`);
  const rMax = Math.min(r0, 1.15 * Math.max(...all));
  const w = rMax / bins, MM2 = 1e6;
  const color = speciesColors(run.summary.species.map((s) => s.mz));
  const legend: LegendEntry[] = [];
  const series = [...byPop.entries()].sort((a, b) => a[0] - b[0]).map(([p, rs]) => {
    const eff = kindNamed(stage.type)!.effectivePotential!(stage, mzOf(p), chargeOf(p))!;
    const counts = new Float64Array(bins);
    for (const r of rs) counts[Math.min(bins - 1, Math.floor(r / w))]++;
    const density = Array.from(counts, (c, b) => c / (Math.PI * ((b + 1) ** 2 - b ** 2) * w * w) / MM2);
    // Normalise exp(−V*/kT) over the disc r < rMax (midpoint rule on 2000 rings: far finer than the bins).
    let z = 0;
    const K = 2000, dr = rMax / K;
    for (let k = 0; k < K; k++) { const r = (k + 0.5) * dr; z += 2 * Math.PI * r * dr * Math.exp(-eff.at(r) / kT); }
    const inside = rs.filter((r) => r < rMax).length;
    const curve = (r: number) => (inside * Math.exp(-eff.at(r) / kT)) / z / MM2;
    const c = color(mzOf(p));
    legend.push({ label: `m/z ${Number(mzOf(p).toPrecision(6))}: ${rs.length} ions`, color: c, mark: 'box' });
    legend.push({ label: `exp(−V*(r)/kT), T = ${T} K: ${eff.label}`, color: c, mark: 'dash' });
    return { density, curve, color: c };
  });
  let yMax = 0;
  for (const s of series) { yMax = Math.max(yMax, ...s.density, s.curve(0)); }
  const etaNote = 'valid where the adiabaticity η is small (iontrail check --analyzer multipole)';
  return {
    title: figureTitle(run.summary, 'radial density against the effective potential'),
    subtitle: `${all.length.toLocaleString('en-US')} ${fate === 'all' ? '' : fate + ' '}ions at the end of the run, ${bins} annuli of ${(w * 1e3).toPrecision(3)} mm; Boltzmann density in V*(r), ${etaNote}`,
    legend,
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'radius r', unit: 'mm', min: 0, max: rMax * 1e3 },
      y: { label: 'ions per mm²', unit: '', min: 0, max: yMax * 1.1 },
      draw: (ctx, g) => {
        for (const s of series) {
          ctx.fillStyle = s.color;
          ctx.globalAlpha = 0.55;
          for (let b = 0; b < bins; b++) {
            if (s.density[b] === 0) continue;
            const x0 = g.px(b * w * 1e3), x1 = g.px((b + 1) * w * 1e3);
            ctx.fillRect(x0, g.py(s.density[b]), Math.max(1, x1 - x0 - 1), g.py(0) - g.py(s.density[b]));
          }
          ctx.globalAlpha = 1;
          ctx.strokeStyle = s.color; ctx.lineWidth = 2; ctx.setLineDash([6, 4]);
          ctx.beginPath();
          for (let k = 0; k <= 200; k++) { const r = (k / 200) * rMax; const X = g.px(r * 1e3), Y = g.py(s.curve(r)); if (k === 0) ctx.moveTo(X, Y); else ctx.lineTo(X, Y); }
          ctx.stroke();
          ctx.setLineDash([]);
        }
      },
    }],
    footer: footerText(run.summary),
  };
}

export const radial: PlotKind = {
  name: 'radial',
  describe: 'radial density of the ions in an RF multipole against the Boltzmann density exp(−V*(r)/kT) of its effective potential',
  flags: { fate: 'which ions: alive (default) | detected | all', bins: 'number of annuli (default 20)' },
  build: async (run, opt) => build(run, opt),
};
