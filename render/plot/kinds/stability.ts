// Stability diagram: the first Mathieu stability region computed by sim/mathieu (Floquet monodromy,
// not a hand-drawn curve), the run's species as labelled (q, a) points of the chosen RF stage, and
// the scan line a/q = 2U/V. Filters in (q, a) of the x motion (y has (−a, −q)); traps in (q_z, a_z)
// with the q_z = 0.908 edge (β_z = 1 at a_z = 0, the low-mass cut-off) marked.

import type { RunFolder } from '../../../sim/runfolder/index.js';
import { firstRegionEdgeQ, firstRegionQuadrupole, firstRegionTrap, quadrupoleApex, quadrupoleUpperEdge, type QA } from '../../../sim/mathieu/boundaries.js';
import { brentRoot } from '../../../sim/mathieu/root-find.js';
import { floquet } from '../../../sim/mathieu/floquet.js';
import { mathieuParameters, mzAtQ } from '../../../sim/mathieu/parameters.js';
import { INK, INK_SOFT, PAPER, REGION_EDGE, REGION_FILL, seriesColor } from '../../common/palette.js';
import { font } from '../../common/fonts.js';
import type { Ctx, FigureSpec, LegendEntry, PanelGeom } from '../figure.js';
import { PlotError, intFlag, type KindOptions, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';
import { rfStages, type RfStage } from '../scene.js';
import { speciesColors } from '../../common/species.js';

interface SpeciesPoint { label: string; name: string; q: number; a: number; stable: boolean; color: string }

function speciesOf(run: RunFolder): { mz: number; charge: number }[] {
  const list = Array.isArray(run.summary.species) ? run.summary.species : [];
  const seen = new Set<string>();
  const out: { mz: number; charge: number }[] = [];
  for (const s of list) {
    if (typeof s.mz !== 'number') continue;
    const charge = typeof s.charge === 'number' && s.charge !== 0 ? s.charge : 1;
    const key = `${s.mz}/${charge}`;
    if (!seen.has(key)) { seen.add(key); out.push({ mz: s.mz, charge }); }
  }
  return out;
}

function polygon(ctx: Ctx, g: PanelGeom, pts: QA[]): void {
  ctx.beginPath();
  pts.forEach((p, i) => (i === 0 ? ctx.moveTo(g.px(p.q), g.py(p.a)) : ctx.lineTo(g.px(p.q), g.py(p.a))));
  ctx.closePath();
}

/**
 * Labels beside their points: the first of right, left, above, below (then further out) that
 * overlaps neither another label nor any point marker and stays inside the panel.
 */
function placeLabels(ctx: Ctx, g: PanelGeom, pts: SpeciesPoint[]): void {
  ctx.font = font(11);
  type Box = { x: number; y: number; w: number; h: number };
  const hit = (a: Box, b: Box) => a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
  const boxes: Box[] = pts.map((p) => ({ x: g.px(p.q) - 7, y: g.py(p.a) - 7, w: 14, h: 14 }));
  const inside = (b: Box) => b.x >= g.left + 2 && b.x + b.w <= g.left + g.width - 2 && b.y >= g.top + 2 && b.y + b.h <= g.top + g.height - 2;
  for (const p of pts) {
    const X = g.px(p.q), Y = g.py(p.a);
    const w = ctx.measureText(p.label).width + 6, h = 15;
    const candidates: Box[] = [];
    for (let ring = 0; ring < 8; ring++) {
      const d = 9 + ring * 12;
      candidates.push(
        { x: X + d, y: Y - h / 2, w, h }, { x: X - d - w, y: Y - h / 2, w, h },
        { x: X - w / 2, y: Y - d - h, w, h }, { x: X - w / 2, y: Y + d, w, h },
        { x: X + d, y: Y - d - h, w, h }, { x: X + d, y: Y + d, w, h },
      );
    }
    const box = candidates.find((c) => inside(c) && !boxes.some((b) => hit(b, c))) ?? candidates[0];
    boxes.push(box);
    ctx.fillStyle = PAPER;
    ctx.globalAlpha = 0.85;
    ctx.fillRect(box.x, box.y, box.w, box.h);
    ctx.globalAlpha = 1;
    ctx.fillStyle = INK;
    ctx.textAlign = 'left';
    ctx.fillText(p.label, box.x + 3, box.y + 11);
    const cx = Math.max(box.x, Math.min(X, box.x + box.w)), cy = Math.max(box.y, Math.min(Y, box.y + box.h));
    if (Math.hypot(cx - X, cy - Y) > 12) {
      ctx.strokeStyle = INK_SOFT; ctx.lineWidth = 0.8;
      ctx.beginPath(); ctx.moveTo(X, Y); ctx.lineTo(cx, cy); ctx.stroke();
    }
  }
}

/**
 * The path of each species' operating point during the RF ramp: q ∝ V at fixed U (a stays), so a
 * horizontal arrow from the start point to the end amplitude's q, cut at the panel's right edge.
 */
function drawRampPaths(ctx: Ctx, g: PanelGeom, pts: SpeciesPoint[], qEnd: number[], qMax: number): void {
  ctx.lineWidth = 1.5;
  pts.forEach((p, i) => {
    const q1 = Math.min(qEnd[i], qMax);
    if (!(q1 > p.q)) return;
    // Species on one a (no DC) would share a line: each arrow a few pixels off its own.
    const X0 = g.px(p.q), X1 = g.px(q1), Y = g.py(p.a) + 4 * (i - (pts.length - 1) / 2);
    ctx.strokeStyle = p.color; ctx.fillStyle = p.color;
    ctx.beginPath(); ctx.moveTo(X0 + 6, Y); ctx.lineTo(X1 - 7, Y); ctx.stroke();
    ctx.beginPath(); ctx.moveTo(X1, Y); ctx.lineTo(X1 - 9, Y - 4); ctx.lineTo(X1 - 9, Y + 4); ctx.closePath(); ctx.fill();
  });
}

function drawPoints(ctx: Ctx, g: PanelGeom, pts: SpeciesPoint[]): void {
  for (const p of pts) {
    const X = g.px(p.q), Y = g.py(p.a);
    ctx.beginPath();
    ctx.arc(X, Y, 5, 0, 2 * Math.PI);
    if (p.stable) { ctx.fillStyle = p.color; ctx.fill(); }
    ctx.lineWidth = 2; ctx.strokeStyle = p.color; ctx.stroke();
  }
}

/**
 * Where the filter's scan line a = s·q runs inside the first region: the q range between its
 * crossings of the upper edge min(−a0, b1) (bracketed on the sampled polygon, then Brent's method on
 * the edge itself), or null when the line passes above the apex.
 */
export function scanWindow(region: QA[], s: number): [number, number] | null {
  const f = (q: number) => quadrupoleUpperEdge(q) - s * q;
  const top = region.filter((p) => p.q > 0 && p.a >= 0);
  const roots: number[] = [];
  // Near q = 0 the edge is ≈ q²/2 (below the line for q < 2s): a crossing before the first sample.
  if (top.length > 0 && top[0].a - s * top[0].q > 0) roots.push(brentRoot(f, Math.min(s, top[0].q) * 1e-3, top[0].q, 1e-12));
  for (let i = 1; i < top.length; i++) {
    const a = top[i - 1], b = top[i];
    const fa = a.a - s * a.q, fb = b.a - s * b.q;
    if (fa === 0) roots.push(a.q);
    else if (fa * fb < 0) roots.push(brentRoot(f, a.q, b.q, 1e-12));
  }
  return roots.length >= 2 ? [roots[0], roots[roots.length - 1]] : null;
}

export const stability: PlotKind = {
  name: 'stability',
  describe: 'first Mathieu stability region (sim/mathieu) with the species as (q, a) points and the scan line',
  flags: {
    stage: 'scene stage index of the quadrupole or trap to use (default: the first RF stage)',
    points: 'boundary samples of the region (default 160)',
  },
  async build(run: RunFolder, opt: KindOptions): Promise<FigureSpec> {
    const stages = rfStages(run.summary);
    if (stages.length === 0) throw new PlotError(`${run.dir}/summary.json: the resolved scene has no quadrupole or trap stage`);
    let stage: RfStage;
    if (opt.values.has('stage')) {
      const idx = intFlag(opt, 'stage', 0, 0, 1000);
      const s = stages.find((x) => x.index === idx);
      if (!s) throw new PlotError(`--stage ${idx}: not a quadrupole or trap stage (RF stages: ${stages.map((x) => x.index).join(', ')})`);
      stage = s;
    } else stage = stages[0];
    const nPts = intFlag(opt, 'points', 160, 8, 5000);
    const trap = stage.analyzer === 'trap';
    const op = { analyzer: stage.analyzer, r0: stage.r0, z0: stage.z0, freq: stage.frequency, rf: stage.amplitude, dc: stage.dc };
    const species = speciesOf(run);
    const colorOf = speciesColors(run.summary.species.map((s) => s.mz));
    const points: SpeciesPoint[] = species.map((s) => {
      const [ref, other] = mathieuParameters({ ...op, mz: s.mz, charge: s.charge });
      // Stable only when both motions are: x and y for the filter, z and r for the trap.
      const stable = floquet(ref.a, ref.q).stable && floquet(other.a, other.q).stable;
      const name = `m/z ${fmt(s.mz)}${s.charge !== 1 ? ` (z = ${s.charge > 0 ? '+' : ''}${s.charge})` : ''}`;
      const label = `${name}: ${trap ? 'a_z' : 'a'} ${ref.a.toFixed(3)}, ${trap ? 'q_z' : 'q'} ${Math.abs(ref.q).toFixed(3)}`;
      return { label, name, q: Math.abs(ref.q), a: ref.a, stable, color: colorOf(s.mz) };
    });
    const anyNegative = points.some((p) => p.a < 0) || (trap ? false : stage.dc < 0);
    const region = trap ? firstRegionTrap(nPts) : firstRegionQuadrupole(nPts, { full: anyNegative });
    const qEdge = firstRegionEdgeQ();
    const qMax = Math.max(trap ? 1.6 : 1.0, ...points.map((p) => p.q * 1.08));
    const regionA = region.map((p) => p.a);
    const aMin = Math.min(trap ? Math.min(...regionA) : anyNegative ? -0.3 : 0, ...points.map((p) => p.a - 0.03));
    const aMax = Math.max(trap ? Math.max(...regionA) * 1.15 : 0.3, ...points.map((p) => p.a + 0.03));
    // Scan line a/q = 2U/V (filter) or a_z/q_z = −2U/V (trap): the locus all m/z share at fixed U, V.
    const slope = (trap ? -2 : 2) * stage.dc / stage.amplitude;
    let pass = '';
    if (!trap) {
      // m/z ∝ 1/q at fixed V (mzAtQ), so the window's right end is its lowest m/z.
      const w = slope > 0 ? scanWindow(region, slope) : null;
      if (slope === 0) pass = `: RF only, m/z ≥ ${fmt(mzAtQ(op, stage.amplitude, qEdge))} stable`;
      else if (w) pass = `: passes m/z ${fmt(mzAtQ(op, stage.amplitude, w[1]))} to ${fmt(mzAtQ(op, stage.amplitude, w[0]))}`;
      else if (slope > 0) pass = ': above the apex, no m/z passes';
    }
    const legend: LegendEntry[] = [
      { label: `first stability region (${trap ? 'z and r' : 'x and y'} stable)`, color: REGION_EDGE, mark: 'region', fill: REGION_FILL },
      { label: `scan line ${trap ? 'a_z/q_z = −2U/V' : 'a/q = 2U/V'} = ${slope.toFixed(4)}${pass}`, color: INK, mark: 'dash' },
    ];
    if (trap) {
      const lmco = mzAtQ(op, stage.amplitude, qEdge);
      const atEnd = stage.ramp ? `, ${fmt(mzAtQ(op, stage.ramp.to, qEdge))} at the end of the ramp` : '';
      legend.push({ label: `q_z = ${qEdge.toFixed(3)} edge: low-mass cut-off m/z ${fmt(lmco)}${stage.ramp ? ' at the start' : ''}${atEnd}`, color: '#D55E00', mark: 'dash' });
    }
    // With an RF ramp, where each species' q goes (a is fixed by the DC, which does not ramp).
    const qEnd = stage.ramp ? species.map((sp) => Math.abs(mathieuParameters({ ...op, rf: stage.ramp!.to, mz: sp.mz, charge: sp.charge })[0].q)) : [];
    if (stage.ramp) {
      legend.push({ label: `RF ramp ${fmtV(stage.amplitude)} → ${fmtV(stage.ramp.to)} V over ${fmt(stage.ramp.over * 1e3)} ms: q of each species along its arrow`, color: INK, mark: 'line' });
    }
    points.forEach((p) => legend.push({ label: `${p.name}${p.stable ? '' : ' (unstable)'}`, color: p.color, mark: p.stable ? 'point' : 'ring' }));
    const apex = trap ? null : quadrupoleApex();
    const rf = `${fmtV(stage.amplitude)} V RF (0-peak)${stage.ramp ? ` at the start` : ''}, ${fmtV(stage.dc)} V DC, ${fmt(stage.frequency / 1e6)} MHz, r0 ${fmt(stage.r0 * 1e3)} mm${trap && stage.z0 !== undefined ? `, z0 ${fmt(stage.z0 * 1e3)} mm` : ''}`;
    return {
      title: figureTitle(run.summary, 'stability diagram'),
      subtitle: `stage ${stage.index} (${stage.analyzer}): ${rf}; filled points stable, open points unstable`,
      legend,
      rows: 1, cols: 1,
      panels: [{
        x: { label: trap ? 'q_z' : 'q', unit: '', min: 0, max: qMax },
        y: { label: trap ? 'a_z' : 'a', unit: '', min: aMin, max: aMax },
        draw: (ctx, g) => {
          polygon(ctx, g, region);
          ctx.fillStyle = REGION_FILL; ctx.fill();
          ctx.strokeStyle = REGION_EDGE; ctx.lineWidth = 2; ctx.stroke();
          // a = 0 axis for reference.
          ctx.strokeStyle = INK_SOFT; ctx.lineWidth = 1;
          ctx.beginPath(); ctx.moveTo(g.left, g.py(0)); ctx.lineTo(g.left + g.width, g.py(0)); ctx.stroke();
          ctx.setLineDash([7, 4]); ctx.strokeStyle = INK; ctx.lineWidth = 1.5;
          ctx.beginPath(); ctx.moveTo(g.px(0), g.py(0)); ctx.lineTo(g.px(qMax * 1.2), g.py(slope * qMax * 1.2)); ctx.stroke();
          if (trap) {
            ctx.strokeStyle = '#D55E00';
            ctx.beginPath(); ctx.moveTo(g.px(qEdge), g.top); ctx.lineTo(g.px(qEdge), g.top + g.height); ctx.stroke();
          }
          ctx.setLineDash([]);
          if (apex) {
            ctx.fillStyle = INK_SOFT; ctx.font = font(11); ctx.textAlign = 'center';
            ctx.fillText(`apex q ${apex.q.toFixed(3)}, a ${apex.a.toFixed(3)}`, g.px(apex.q), g.py(apex.a) - 8);
          }
          if (stage.ramp) drawRampPaths(ctx, g, points, qEnd, qMax);
          drawPoints(ctx, g, points);
        },
        overlay: (ctx, g) => placeLabels(ctx, g, points),
      }],
      footer: footerText(run.summary),
    };
  },
};

function fmt(v: number): string { return String(Number(v.toPrecision(4))); }
function fmtV(v: number): string { return String(Number(v.toPrecision(4))); }
