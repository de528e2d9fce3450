// iontrail check: Mathieu stability and the design figures of one operating point (or several m/z)
// of a quadrupole filter or an RF trap. Parsing and formatting only; the physics is sim/mathieu.

import { STAGE_KINDS } from '../../sim/stages/registry.js';
import { parseArgs, flag, requireFlag, closest } from '../args.js';
import { UsageError } from '../errors.js';
import { parseQuantity, formatSI } from '../../sim/units/quantity.js';
import { analyzeOperatingPoint, type OperatingPointReport, type AxisReport } from '../../sim/mathieu/operating-point.js';
import type { Analyzer, OperatingPoint } from '../../sim/mathieu/parameters.js';
import { multipoleFigures } from '../../sim/mathieu/multipole.js';
import { linearTrapFigures } from '../../sim/mathieu/linear-trap.js';

export const describe = 'Mathieu a/q, stability, β, secular frequencies and m/z limits of an operating point';

// The Mathieu geometries of the RF stage kinds (sim/stages/registry.ts), in registry order.
const ANALYZERS: readonly Analyzer[] = STAGE_KINDS.flatMap((k) => (k.analyzer ? [k.analyzer] : []));

function help(): string {
  return [
    'usage: iontrail check --analyzer quadrupole --r0 4mm --freq 1.2MHz --rf 600V [--dc 100V] --mz 502 [--charge 1] [--json]',
    '       iontrail check --analyzer trap --r0 7.07mm [--z0 5mm] --freq 1.05MHz --rf 400V [--dc 0V] --mz 609 [--charge 1] [--json]',
    '',
    '  --analyzer  quadrupole | trap',
    '  --r0        field radius (rod inscribed radius, or ring inner radius), e.g. 4mm',
    '  --z0        trap only: centre to end cap; default r0/√2',
    '  --freq      RF frequency f (Ω = 2πf), e.g. 1.2MHz',
    '  --rf        RF amplitude V, zero-to-peak, rod (or ring) to ground, e.g. 600V',
    '  --dc        DC U, rod (or ring) to ground; default 0V; negative values allowed (--dc=-12V)',
    '  --mz        m/z in u per charge; a comma list gives one result per value',
    '  --charge    charge number z (sign included); default 1',
    '  --rf-max    largest RF amplitude of the supply: reports the highest m/z reachable',
    '  --qeject    trap cut-off q_z for the low-mass cut-off; default 0.908',
    '  --json      one JSON object (an array for several m/z), SI units',
    '',
    'usage: iontrail check --analyzer multipole --poles 8 --r0 2mm --freq 5MHz --rf 200V --mz 100 [--radius 1mm] [--charge 1] [--json]',
    '  RF-only multipole of 2n rods (Gerlich 1992): effective potential V*(r) at --radius (default r0) and',
    '  at r0, the adiabaticity parameter η there and the radius where η reaches 0.3',
    '',
    'usage: iontrail check --analyzer linear-trap --r0 4mm --length 40mm --freq 1MHz --rf 200V [--dc 0V] --end-dc 10V --kappa 0.05 --mz 200 [--charge 1] [--json]',
    '  linear quadrupole trap, end electrodes as the ideal well κ·U_end·(2z² − x² − y²)/(2 z0²), z0 = length/2:',
    '  Mathieu a, q and β of x and y (a shifted by −4eκU_end/(m z0² Ω²)), radial and axial secular frequencies;',
    '  κ is the end electrodes\' geometric factor (from a field solution or a measured axial frequency)',
    '',
  ].join('\n');
}

interface CheckInput {
  base: Omit<OperatingPoint, 'mz' | 'charge'>;
  mzList: number[];
  charge: number;
  rfMax?: number;
  qEject?: number;
  json: boolean;
}

function positive(text: string, dim: 'length' | 'frequency' | 'voltage', name: string): number {
  const v = parseQuantity(text, dim, `check: --${name}`);
  if (!(v > 0)) throw new UsageError(`check: --${name} must be positive, got '${text}'`);
  return v;
}

/** Parse and validate the command line (throws UsageError / QuantityError with one-line messages). */
export function parseCheckArgs(argv: string[]): CheckInput {
  const args = parseArgs(argv, {
    values: ['analyzer', 'r0', 'z0', 'freq', 'rf', 'dc', 'mz', 'charge', 'rf-max', 'qeject'],
    switches: ['json', 'help'],
  }, 'check');
  if (args.positional.length > 0) throw new UsageError(`check: unexpected argument '${args.positional[0]}'`);
  const analyzerText = requireFlag(args, 'analyzer', 'check', 'quadrupole');
  if (!(ANALYZERS as readonly string[]).includes(analyzerText)) {
    const hint = closest(analyzerText, ANALYZERS);
    throw new UsageError(`check: --analyzer expects quadrupole, trap, multipole or linear-trap, got '${analyzerText}'${hint ? ` (did you mean '${hint}'?)` : ''}`);
  }
  const analyzer = analyzerText as Analyzer;
  const r0 = positive(requireFlag(args, 'r0', 'check', analyzer === 'trap' ? '7.07mm' : '4mm'), 'length', 'r0');
  const z0Text = flag(args, 'z0');
  if (z0Text !== undefined && analyzer !== 'trap') throw new UsageError('check: --z0 applies only to --analyzer trap');
  const z0 = z0Text === undefined ? undefined : positive(z0Text, 'length', 'z0');
  const freq = positive(requireFlag(args, 'freq', 'check', '1.2MHz'), 'frequency', 'freq');
  const rf = positive(requireFlag(args, 'rf', 'check', '600V'), 'voltage', 'rf');
  const dcText = flag(args, 'dc');
  const dc = dcText === undefined ? 0 : parseQuantity(dcText, 'voltage', 'check: --dc');
  const mzText = requireFlag(args, 'mz', 'check', '502');
  const mzList = mzText.split(',').map((s) => {
    const t = s.trim();
    const v = /^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN;
    if (!(v > 0) || !Number.isFinite(v)) throw new UsageError(`check: --mz expects positive m/z values such as 502 or 502,609, got '${t}'`);
    return v;
  });
  const chargeText = flag(args, 'charge') ?? '1';
  if (!/^[+-]?\d+$/.test(chargeText.trim()) || Number(chargeText) === 0) {
    throw new UsageError(`check: --charge expects a non-zero whole charge number such as 1, 2 or -1, got '${chargeText}'`);
  }
  const charge = Number(chargeText);
  const rfMaxText = flag(args, 'rf-max');
  const rfMax = rfMaxText === undefined ? undefined : positive(rfMaxText, 'voltage', 'rf-max');
  const qText = flag(args, 'qeject');
  let qEject: number | undefined;
  if (qText !== undefined) {
    if (analyzer !== 'trap') throw new UsageError('check: --qeject applies only to --analyzer trap');
    qEject = parseQuantity(qText, 'dimensionless', 'check: --qeject');
    if (!(qEject > 0 && qEject < 2)) throw new UsageError(`check: --qeject expects a q_z between 0 and 2 such as 0.908, got '${qText}'`);
  }
  return { base: { analyzer, r0, z0, freq, rf, dc }, mzList, charge, rfMax, qEject, json: args.switches.has('json') };
}

type Keyed<T> = Record<string, T>;

function byAxis<T>(r: OperatingPointReport, pick: (x: AxisReport) => T): Keyed<T> {
  const out: Keyed<T> = {};
  for (const x of r.axes) out[x.axis] = pick(x);
  return out;
}

/** The JSON object of one result (SI units; keys documented in the README). */
export function checkJson(r: OperatingPointReport): Record<string, unknown> {
  const obj: Record<string, unknown> = {
    analyzer: r.analyzer,
    mz: r.mz,
    charge: r.charge,
    a: byAxis(r, (x) => x.a),
    q: byAxis(r, (x) => x.q),
    stable: r.stable,
    first_region: r.firstRegion,
    beta: byAxis(r, (x) => x.beta),
    beta_small_q: byAxis(r, (x) => x.betaSmallQ),
    secular_frequency_hz: byAxis(r, (x) => x.secularFrequencyHz),
    sidebands_hz: byAxis(r, (x) => x.sidebandsHz),
    well_depth_v: byAxis(r, (x) => x.wellDepthV),
    well_depth_valid: byAxis(r, (x) => x.wellDepthValid),
    mz_window: r.mzWindow,
    mz_margin: r.mzMargin,
  };
  if (r.analyzer === 'trap') {
    obj.lmco_mz = r.lmcoMz;
    obj.q_eject = r.qEject;
  }
  if (r.mzMax !== null) { obj.rf_max_v = r.rfMax; obj.mz_max = r.mzMax; }
  obj.inputs = { r0_m: r.r0, ...(r.z0 !== null ? { z0_m: r.z0 } : {}), freq_hz: r.freq, rf_v: r.rf, dc_v: r.dc };
  obj.notes = {
    beta: 'exact, from the Floquet monodromy matrix over one RF period',
    beta_small_q: 'small-q approximation sqrt(a + q^2/2), for comparison only',
    well_depth_v: 'Dehmelt pseudopotential depth per charge at the electrode distance; valid for |q| < 0.4; null when the axis is unstable (no well)',
    rf_v: 'zero-to-peak, measured rod (ring) to ground',
  };
  return obj;
}

function fixed(v: number | null, digits: number): string {
  return v === null ? '—' : v.toFixed(digits);
}

function mzText(v: number): string {
  return v >= 100 ? v.toFixed(1) : v.toPrecision(4);
}

/** Human-readable lines of one result. */
export function checkLines(r: OperatingPointReport): string[] {
  const lines: string[] = [];
  const geom = r.analyzer === 'trap'
    ? `r0 ${formatSI(r.r0, 'm')}, z0 ${formatSI(r.z0 ?? 0, 'm')}`
    : `r0 ${formatSI(r.r0, 'm')}`;
  lines.push(`${r.analyzer}  ${geom}, f ${formatSI(r.freq, 'Hz')}, RF ${formatSI(r.rf, 'V')} (0-p), DC ${r.dc === 0 ? '0 V' : formatSI(r.dc, 'V')}; m/z ${r.mz}, z ${r.charge > 0 ? '+' : ''}${r.charge}`);
  const head = ['axis', 'a', 'q', 'β', 'β small-q', 'secular', 'sidebands', 'well depth'];
  const rows = r.axes.map((x) => [
    x.axis,
    x.a.toFixed(5),
    x.q.toFixed(5),
    x.beta === null ? 'unstable' : x.beta.toFixed(5),
    fixed(x.betaSmallQ, 5),
    x.secularFrequencyHz === null ? '—' : formatSI(x.secularFrequencyHz, 'Hz'),
    x.sidebandsHz === null ? '—' : `${formatSI(x.sidebandsHz[0], 'Hz')} / ${formatSI(x.sidebandsHz[1], 'Hz')}`,
    x.wellDepthV === null ? 'none' : `${formatSI(x.wellDepthV, 'V')}${x.wellDepthValid ? '' : ' (|q| ≥ 0.4: rough)'}`,
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i].length)));
  const fmt = (cells: string[]) => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ').trimEnd();
  lines.push(fmt(head));
  for (const row of rows) lines.push(fmt(row));
  const w = r.mzWindow;
  const windowLabel = r.analyzer === 'trap' ? 'stored m/z range' : 'transmitted m/z window';
  if (w === null) lines.push(`${windowLabel} at this DC/RF ratio: none (the scan line misses the first region)`);
  else if (w.high === null) lines.push(`${windowLabel} at this DC/RF ratio: m/z ≥ ${mzText(w.low)} (no upper limit with DC = 0)`);
  else lines.push(`${windowLabel} at this DC/RF ratio: m/z ${mzText(w.low)} – ${mzText(w.high)} (m/Δm ≈ ${w.resolution!.toFixed(0)})`);
  if (r.mzMargin !== null) {
    const pct = (d: number) => `${((100 * d) / r.mz).toFixed(1)} %`;
    const above = r.mzMargin.above === null ? 'no high edge' : `${mzText(r.mzMargin.above)} (${pct(r.mzMargin.above)}) below the high edge`;
    lines.push(`m/z ${r.mz} sits ${mzText(r.mzMargin.below)} (${pct(r.mzMargin.below)}) above the low edge, ${above}`);
  }
  if (r.lmcoMz !== null) lines.push(`low-mass cut-off (q_z = ${r.qEject}): m/z ${mzText(r.lmcoMz)}`);
  if (r.mzMax !== null) {
    const where = r.analyzer === 'trap' ? `at q_z = ${r.qEject}` : 'at the apex of the first region';
    lines.push(`highest m/z at RF ${formatSI(r.rfMax!, 'V')} (0-p) ${where}: m/z ${mzText(r.mzMax)}`);
  }
  lines.push(verdict(r));
  return lines;
}

function verdict(r: OperatingPointReport): string {
  const names = r.axes.map((x) => x.axis).join(' and ');
  const kept = r.analyzer === 'trap' ? 'held' : 'passes';
  const lost = r.analyzer === 'trap' ? 'not held' : 'does not pass';
  if (r.firstRegion) return `verdict: m/z ${r.mz} ${kept}: bounded motion on ${names}, inside the first stability region.`;
  if (r.stable) return `verdict: m/z ${r.mz} has bounded motion on ${names} but outside the first stability region (β > 1 on some axis).`;
  const bad = r.axes.filter((x) => !x.stable).map((x) => x.axis).join(' and ');
  return `verdict: m/z ${r.mz} ${lost}: the ${bad} motion grows without bound.`;
}

const SAFETY = 'caution: RF and DC supplies at these amplitudes can kill; wiring and bench checks follow local electrical-safety codes and are done by qualified staff.';

export async function run(argv: string[]): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    process.stdout.write(help());
    return 0;
  }
  if (analyzerRequested(argv, 'multipole')) return runMultipole(argv);
  if (analyzerRequested(argv, 'linear-trap')) return runLinearTrap(argv);
  const input = parseCheckArgs(argv);
  const reports = input.mzList.map((mz) =>
    analyzeOperatingPoint({ ...input.base, mz, charge: input.charge }, { rfMax: input.rfMax, qEject: input.qEject }));
  if (input.json) {
    const body = reports.length === 1 ? checkJson(reports[0]) : reports.map(checkJson);
    process.stdout.write(JSON.stringify(body, null, 2) + '\n');
  } else {
    const blocks = reports.map((r) => checkLines(r).join('\n'));
    process.stdout.write(blocks.join('\n\n') + '\n' + SAFETY + '\n');
  }
  return 0;
}

/** `--analyzer NAME` (either spelling of the flag). */
function analyzerRequested(argv: string[], name: string): boolean {
  const i = argv.indexOf('--analyzer');
  return (i >= 0 && argv[i + 1] === name) || argv.includes(`--analyzer=${name}`);
}

/** Linear traps: radial Mathieu a, q, β with the well's shift and the axial secular frequency (sim/mathieu/linear-trap.ts). */
function runLinearTrap(argv: string[]): number {
  const args = parseArgs(argv, { values: ['analyzer', 'r0', 'length', 'freq', 'rf', 'dc', 'end-dc', 'kappa', 'mz', 'charge'], switches: ['json', 'help'] }, 'check');
  if (args.positional.length > 0) throw new UsageError(`check: unexpected argument '${args.positional[0]}'`);
  const r0 = positive(requireFlag(args, 'r0', 'check', '4mm'), 'length', 'r0');
  const length = positive(requireFlag(args, 'length', 'check', '40mm'), 'length', 'length');
  const freq = positive(requireFlag(args, 'freq', 'check', '1MHz'), 'frequency', 'freq');
  const rf = positive(requireFlag(args, 'rf', 'check', '200V'), 'voltage', 'rf');
  const dcText = flag(args, 'dc');
  const dc = dcText === undefined ? 0 : parseQuantity(dcText, 'voltage', 'check: --dc');
  const endDc = positive(requireFlag(args, 'end-dc', 'check', '10V'), 'voltage', 'end-dc');
  const kappaText = requireFlag(args, 'kappa', 'check', '0.05');
  const kappa = /^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(kappaText.trim()) ? Number(kappaText) : NaN;
  if (!(kappa > 0 && kappa <= 1)) throw new UsageError(`check: --kappa expects the end electrodes' geometric factor, a plain number in (0, 1] such as 0.05, got '${kappaText}'`);
  const mzText = requireFlag(args, 'mz', 'check', '200');
  const mz = Number(mzText);
  if (!(mz > 0) || !Number.isFinite(mz)) throw new UsageError(`check: --mz expects a positive m/z such as 200, got '${mzText}'`);
  const chargeText = flag(args, 'charge') ?? '1';
  if (!/^[+-]?\d+$/.test(chargeText.trim()) || Number(chargeText) === 0) throw new UsageError(`check: --charge expects a non-zero whole number, got '${chargeText}'`);
  const charge = Number(chargeText);
  const z0 = length / 2;
  const r = linearTrapFigures({ r0, z0, freq, rf, dc, endDc, kappa, mz, charge });
  if (args.switches.has('json')) {
    process.stdout.write(JSON.stringify({ analyzer: 'linear-trap', mz, charge, r0_m: r0, z0_m: z0, freq_hz: freq, rf_v: rf, dc_v: dc, end_dc_v: endDc, kappa, ...r }, null, 2) + '\n');
    return 0;
  }
  const mm = (v: number) => `${(v * 1e3).toPrecision(4)} mm`;
  const f = (v: number) => (v !== 0 && Math.abs(v) < 1e-3 ? v.toExponential(3) : v.toPrecision(5));
  const axis = (name: string, a: number, q: number, beta: number | null, stable: boolean, sec: number | null) =>
    `  ${name}: a = ${f(a)}, q = ${f(q)}, ${stable ? `stable, β = ${f(beta!)}, secular ${formatSI(sec!, 'Hz')}` : 'UNSTABLE'}`;
  const lines = [
    `linear trap r0 ${mm(r0)}, rods ${mm(length)} (z0 ${mm(z0)}), f ${formatSI(freq, 'Hz')}, V ${formatSI(rf, 'V')} (0-peak), U ${formatSI(dc, 'V')}, end electrodes ${formatSI(endDc, 'V')}, κ ${kappa}, m/z ${mz}`,
    axis('x (slotted rods)', r.a_x, r.q_x, r.beta_x, r.stable_x, r.radial_secular_x_hz),
    axis('y', r.a_y, r.q_y, r.beta_y, r.stable_y, r.radial_secular_y_hz),
    `  the axial well shifts both a by ${r.a_shift.toPrecision(3)} (−4eκU_end/(m z0² Ω²))`,
    r.axial_secular_hz === null ? '  axial: the end electrodes do not hold this ion' : `  axial secular frequency ${formatSI(r.axial_secular_hz, 'Hz')} (ω_z² = 2eκU_end/(m z0²)), well depth κ·U_end = ${formatSI(r.axial_well_depth_v, 'V')}`,
  ];
  process.stdout.write(lines.join('\n') + '\n' + SAFETY + '\n');
  return 0;
}

/** RF-only multipoles: Gerlich's effective potential and adiabaticity (sim/mathieu/multipole.ts). */
function runMultipole(argv: string[]): number {
  const args = parseArgs(argv, { values: ['analyzer', 'poles', 'r0', 'freq', 'rf', 'mz', 'charge', 'radius'], switches: ['json', 'help'] }, 'check');
  if (args.positional.length > 0) throw new UsageError(`check: unexpected argument '${args.positional[0]}'`);
  const polesText = requireFlag(args, 'poles', 'check', '8');
  const poles = /^\d+$/.test(polesText.trim()) ? Number(polesText) : NaN;
  if (!(poles >= 4 && poles % 2 === 0)) throw new UsageError(`check: --poles expects an even number of rods, 4 or more (4, 6, 8, ...), got '${polesText}'`);
  const r0 = positive(requireFlag(args, 'r0', 'check', '2mm'), 'length', 'r0');
  const freq = positive(requireFlag(args, 'freq', 'check', '5MHz'), 'frequency', 'freq');
  const rf = positive(requireFlag(args, 'rf', 'check', '200V'), 'voltage', 'rf');
  const mzText = requireFlag(args, 'mz', 'check', '100');
  const mz = Number(mzText);
  if (!(mz > 0) || !Number.isFinite(mz)) throw new UsageError(`check: --mz expects a positive m/z such as 100, got '${mzText}'`);
  const chargeText = flag(args, 'charge') ?? '1';
  if (!/^[+-]?\d+$/.test(chargeText.trim()) || Number(chargeText) === 0) throw new UsageError(`check: --charge expects a non-zero whole number, got '${chargeText}'`);
  const radiusText = flag(args, 'radius');
  const radius = radiusText === undefined ? r0 : positive(radiusText, 'length', 'radius');
  if (radius > r0) throw new UsageError(`check: --radius ${radiusText} lies beyond the rods' inscribed radius r0`);
  const r = multipoleFigures({ poles, r0, freq, rf, mz, charge: Number(chargeText), radius });
  if (args.switches.has('json')) {
    process.stdout.write(JSON.stringify({ analyzer: 'multipole', mz, charge: Number(chargeText), r0_m: r0, freq_hz: freq, rf_v: rf, ...r }, null, 2) + '\n');
    return 0;
  }
  const mm = (v: number) => `${(v * 1e3).toPrecision(4)} mm`;
  const lines = [
    `${poles}-pole RF guide, r0 ${mm(r0)}, f ${formatSI(freq, 'Hz')}, V ${formatSI(rf, 'V')} (0-peak), m/z ${mz}`,
    `  effective potential V*(${mm(radius)}) = ${r.effective_potential_ev.toPrecision(4)} eV; depth at r0 ${r.depth_at_r0_ev.toPrecision(4)} eV (Gerlich 1992)`,
    `  adiabaticity η = ${r.eta_at_radius.toPrecision(3)} at ${mm(radius)}, ${r.eta_at_r0.toPrecision(3)} at r0`,
    r.n === 2
      ? `  quadrupole: η is the same at every radius (the Mathieu q); η < ${r.eta_limit} ${r.eta_at_r0 < r.eta_limit ? 'holds' : 'does not hold'}`
      : r.eta_limit_radius_m === null
        ? `  η stays below ${r.eta_limit} inside r0: the effective potential holds out to the rods`
        : `  η reaches ${r.eta_limit} at r = ${mm(r.eta_limit_radius_m)}: beyond it the effective potential does not hold`,
  ];
  process.stdout.write(lines.join('\n') + '\n' + SAFETY + '\n');
  return 0;
}
