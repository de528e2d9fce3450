import type { RfDrive, StageBase } from '../base.js';
import type { FieldProblem } from '../../fields/problem.js';

/**
 * A stage whose field comes from its electrodes: the Laplace problem in stage-local SI
 * (sim/fields/problem.ts), solved by `iontrail field` or before a run. Volts on electrode k are
 * dc_k + rf_k × the stage's RF drive + aux_k × its supplementary AC.
 */
export interface ElectrodesStage extends StageBase {
  type: 'electrodes';
  problem: FieldProblem;
  rf?: RfDrive;
  /** Supplementary AC (e.g. dipolar between the end caps of a trap): amplitude zero-to-peak, V. */
  aux?: { amplitude: number; frequency: number; phase: number };
  /** `multipole`: track in the fitted multipole series of a planar grid instead of the grid. */
  path?: 'grid' | 'multipole';
  /** How ions are tracked through the field (set by the run's preparation, shown in provenance). */
  field_path?: { path: 'interpolated grid' | 'multipole series'; cache_key: string; nodes: number; orders?: number; reference_radius_m?: number };
}
