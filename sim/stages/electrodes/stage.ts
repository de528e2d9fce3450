import type { RfDrive, StageBase } from '../base.js';
import type { FieldProblem } from '../../fields/problem.js';

/**
 * A stage whose field comes from its electrodes: the Laplace problem in stage-local SI
 * (sim/fields/problem.ts), solved by `iontrail field`. Volts on electrode k are
 * dc_k + rf_k × the stage's RF drive.
 */
export interface ElectrodesStage extends StageBase {
  type: 'electrodes';
  problem: FieldProblem;
  rf?: RfDrive;
}
