// Worker thread of the direct sweep: receives (scene, ion range) tasks, integrates the ions with
// the engine's trackBatch and answers with the counts. Counts are integers summed per point, so a
// sweep's numbers do not depend on how its batches were spread over workers.

import { serveTasks } from '../core/executor.js';
import { directCounts, type PointBatch } from './direct-path.js';

serveTasks((t: PointBatch) => directCounts(t.scene, t.start, t.count));
