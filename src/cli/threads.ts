/**
 * Chunks of a seeded computation shared between this thread and one worker
 * thread (model-worker.ts) when the machine has a second core: even chunks
 * here, odd chunks there, results back in chunk order, so the output does not
 * depend on the split. At most one worker: the machine is shared.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { WorkerJob } from './model-worker.js';

export async function splitOverThreads<R, A>(kind: WorkerJob['kind'], requests: R[], local: (r: R) => A): Promise<A[]> {
  if (availableParallelism() < 2 || requests.length < 2) return requests.map(local);
  const mine = requests.filter((_r, i) => i % 2 === 0);
  const theirs = requests.filter((_r, i) => i % 2 === 1);
  const worker = new Worker(new URL('./model-worker.js', import.meta.url), { execArgv: [] });
  const answer = new Promise<A[]>((resolve, reject) => {
    worker.once('message', (m: A[]) => resolve(m));
    worker.once('error', reject);
    worker.once('exit', (code) => reject(new Error(`model worker stopped (exit code ${code})`)));
  });
  worker.postMessage({ kind, requests: theirs } as WorkerJob);
  const here = mine.map(local);
  const there = await answer;
  await worker.terminate();
  return requests.map((_r, i) => (i % 2 === 0 ? here[i / 2]! : there[(i - 1) / 2]!));
}
