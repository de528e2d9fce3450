// Worker thread of the direct sweep: receives (task id, scene, ion range), integrates the ions with
// the engine's trackBatch and answers with the counts. Counts are integers summed per point, so a
// sweep's numbers do not depend on how its batches were spread over workers.

import { parentPort } from 'node:worker_threads';
import type { Scene } from '../scene/types.js';
import { directCounts } from './direct-path.js';

parentPort!.on('message', (msg: { id: number; scene: Scene; start: number; count: number } | null) => {
  if (msg === null) { parentPort!.close(); return; }
  const detected = directCounts(msg.scene, msg.start, msg.count);
  parentPort!.postMessage({ id: msg.id, detected });
});
