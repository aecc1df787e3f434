/**
 * A worker thread of `elastimate scenario --intervals`: it computes the
 * Monte Carlo chunks it is sent (src/model/scenario-intervals.ts) and answers
 * with their results. Chunk c always uses random stream c, so the answer does
 * not depend on which thread computed it.
 */
import { parentPort } from 'node:worker_threads';
import { scenarioChunk, type ChunkRequest, type ChunkResult } from '../model/scenario-intervals.js';

const port = parentPort;
if (port) {
  port.on('message', (requests: ChunkRequest[]) => {
    const results: ChunkResult[] = requests.map(scenarioChunk);
    port.postMessage(results);
  });
}
