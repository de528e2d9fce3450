// What a kind of stage provides. Everything the loader, the engine, the fast path, the reports
// and the renderer need to know about one type of stage is answered here, looked up once per
// stage (when an ion enters it, or when a figure is drawn), never by switching on its name.

import type { Field } from '../scene/schema.js';
import type { FieldModel } from '../core/field-model.js';
import type { StageCoupling } from '../core/coupling.js';
import type { ExitCode, IonCursor, StepContext } from '../core/cursor.js';
import type { FateCode } from '../core/batch.js';
import type { GasSettings } from '../gas/settings.js';
import type { Analyzer, OperatingPoint } from '../mathieu/parameters.js';
import type { RfDrive } from './base.js';
import type { Stage } from './types.js';
import type { ElectrodeLabel, OutlinePart } from './outline.js';
import type { FieldProblem, FieldSolution } from '../fields/problem.js';

/** What an entry's resolution gets besides its validated keys. */
export interface ResolveContext {
  /** Lab z of the entrance of the first stage this entry makes, m. */
  z: number;
  /** Index of the entry in the scene's `stages:` list. */
  index: number;
  /** The entry's own gas block, resolved. */
  gas?: GasSettings;
  /**
   * Throws the loader's one-line error for key `key` of this entry: a key of the entry, a dotted
   * path inside it ("electrodes.1.shapes.0"), or the path as a list.
   */
  fail(key: string | readonly (string | number)[], message: string): never;
}

/** One `type:` value of the scene file: its keys (with units) and how it resolves to SI stages. */
export interface StageEntry {
  fields: Record<string, Field>;
  required?: readonly string[];
  /** The resolved stages (one, or more for an entry such as a two-field source), entrance first. */
  resolve(raw: Record<string, any>, at: ResolveContext): Stage[];
}

/** Settings of the run a kernel reads. */
export interface KernelSettings {
  integrator: 'rk4' | 'dopri5';
  stepsPerCycle: number;
  tolerance: number;
  stepNoRf: number;
}

/**
 * The Mathieu geometry of a stage whose RF amplitude ramps for a mass-selective scan
 * (sim/analysis/trap-scan.ts): the motion that ejects and its a and q.
 */
export interface MassScanGeometry {
  /** The ejecting coordinate's q in summary keys: 'qz' (3D trap, along z), 'qx' (radial, x rods). */
  readonly qKey: string;
  /** Where an ejected ion goes, for the report's assumptions ("along z through the far end cap ..."). */
  readonly ejection: string;
  readonly rf: RfDrive;
  /** Supplementary dipolar AC along the ejecting coordinate, if any. */
  readonly aux?: { amplitude: number; frequency: number; phase: number };
  /** Mathieu a of the ejecting coordinate for an ion of this m/z (charge 1). */
  a(mz: number): number;
  /** Mathieu q of the ejecting coordinate at RF amplitude `amplitude` (V) for this m/z. */
  q(amplitude: number, mz: number): number;
  /** m/z per volt of RF amplitude for ions ejected at q = qEject. */
  mzPerVolt(qEject: number): number;
}

export interface StageKind<S extends Stage = Stage> {
  readonly type: S['type'];
  /** Scene-file entries this kind reads (a kind may read several, e.g. reflectron and source). */
  readonly entries: Readonly<Record<string, StageEntry>>;
  /**
   * Stages of this kind hold ions (a trap): the cloud's size and energy over time are figures of
   * merit, so the default history grid resolves their secular motion (sim/scene/secular.ts).
   */
  readonly holdsIons: boolean;
  /** Stages of this kind carry an RF drive (the kind's `rf` gives it per stage). */
  readonly hasRf: boolean;
  /** The RF drive of the stage, or undefined when it has none. */
  rf(st: S): RfDrive | undefined;
  field(st: S): FieldModel;
  /**
   * The stage in a coupled space-charge run (sim/core/coupling.ts: the field of its kicks or of
   * its closed-form flight, the electrode test, the plates of its end planes). A kind without it
   * cannot take part in a space-charge run yet, and such a scene is refused with one line.
   */
  coupling?(st: S): StageCoupling;
  /** Move the ion from its entry to its exit (or loss, or max_time) through the stage. */
  track(st: S, c: IonCursor, ctx: StepContext, run: KernelSettings): ExitCode;
  /**
   * What leaving through the exit (forward) or back through the entrance means before the
   * engine's own rules (last stage: detected; first stage: returned): a fate, or undefined.
   */
  exitFate(st: S, forward: boolean): FateCode | undefined;
  /**
   * Radius of the opening in the stage's exit plane (z = zEnd), m, or undefined when the plane is
   * open. A detector at the exit of the last stage defaults to it (sim/scene/detector.ts).
   */
  exitAperture(st: S): number | undefined;
  /** The field is uniform in the stage, so the drag gas model's exact step in a uniform field applies. */
  readonly uniformField: boolean;
  /** The kernel takes the hard-sphere gas as kernel pieces (locals), not as a plain step. */
  readonly gasPieces: boolean;
  /**
   * Resolved keys the transfer-matrix fast path understands, or undefined when it never applies;
   * a key outside the set (a feature added later) sends a scene to direct integration.
   */
  readonly fastPathKeys?: ReadonlySet<string>;
  /** The Mathieu geometry of the kind's RF stages (sim/mathieu/parameters.ts), if it has RF. */
  readonly analyzer?: Analyzer;
  /** Mathieu geometry of an RF stage (sim/mathieu/parameters.ts), without the ion. */
  operatingPoint?(st: S): Omit<OperatingPoint, 'mz' | 'charge'> & { analyzer: Analyzer };
  /**
   * The radial effective (pseudo)potential of a stored stage for an ion of this m/z and charge:
   * V*(r) in J, or undefined when the kind has none (render/plot/kinds/radial.ts draws the
   * Boltzmann density exp(−V* / kT) from it).
   */
  effectivePotential?(st: Readonly<Record<string, unknown>>, mz: number, charge: number): { at(r: number): number; r0: number; label: string } | undefined;
  /** Mass-scan geometry of the stage when its RF ramps (a trap of either shape), else undefined. */
  massScan?(st: S): MassScanGeometry | undefined;
  /** One line for figure subtitles, e.g. "quadrupole 150 mm, r0 4.00 mm". */
  describe(st: Readonly<Record<string, unknown>>): string;
  /** Electrode outline for the renderer (scene data: stage-local SI lengths). */
  outline(st: Readonly<Record<string, unknown>>): OutlinePart[];
  /**
   * Names and voltages of the stage's electrodes for the 3D view (scene data as stored in a run
   * folder's provenance: stage-local SI lengths, volts). Empty for a stage with nothing to label.
   */
  electrodeLabels(st: Readonly<Record<string, unknown>>): ElectrodeLabel[];
  /**
   * Why ions cannot be tracked through stages of this kind yet (`run`, `sweep` and `report` refuse
   * a scene with one, in one line), or undefined when they can.
   */
  readonly trackingUnavailable?: string;
  /**
   * Why `integrator: dopri5` cannot integrate stages of this kind (the run is refused in one line rather
   * than quietly stepped with RK4), or undefined when it can.
   */
  readonly adaptiveUnavailable?: string;
  /** The Laplace problem of a stage whose field is solved from its electrodes (`iontrail field`). */
  fieldProblem?(st: S): FieldProblem;
  /**
   * Hand the solved field of `fieldProblem` to this thread's kernel before ions are tracked; returns what
   * provenance says about the flight (stored on the stage by the caller's preparation).
   */
  useSolution?(st: S, solution: FieldSolution): void;
  /** The field-model assumptions a report lists for a scene with a stage of this kind. */
  readonly assumptions: readonly string[];
  /**
   * Values of the stage that are legal but implausible for a real instrument (an r0 of metres, a
   * drift of tens of metres), each with its reason: warnings, not errors (sim/engine/checks.ts).
   */
  plausibility(st: S): string[];
}
