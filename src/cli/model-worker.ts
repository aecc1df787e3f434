/**
 * A worker thread of `elastimate scenario --intervals` and `elastimate
 * synthetic`: it computes the chunks it is sent (src/model/) and answers with
 * their results. Chunk c always uses random stream c of the seed, so the
 * answer does not depend on which thread computed it.
 */
import { parentPort } from 'node:worker_threads';
import { scenarioChunk, type ChunkRequest } from '../model/scenario-intervals.js';
import { syntheticChunk, type NearTarget, type SyntheticRow } from '../model/synthetic.js';
import type { ElastanceShape } from '../model/double-hill.js';

export interface SyntheticRequest {
  seed: number;
  chunk: number;
  count: number;
  shapes: ElastanceShape[];
  near?: NearTarget;
}

export type WorkerJob = { kind: 'scenario'; requests: ChunkRequest[] } | { kind: 'synthetic'; requests: SyntheticRequest[] };

export function runSyntheticRequest(r: SyntheticRequest): SyntheticRow[] {
  return syntheticChunk(r.seed, r.chunk, r.count, r.shapes, true, r.near);
}

const port = parentPort;
if (port) {
  port.on('message', (job: WorkerJob) => {
    port.postMessage(job.kind === 'scenario' ? job.requests.map(scenarioChunk) : job.requests.map(runSyntheticRequest));
  });
}
