/**
 * Worker entry of the parallel analyzer (see `analyze-parallel.ts`): builds
 * the analyzer once from the settings it starts with, then answers each
 * chunk of texts with the new terms and the chunk's documents as distinct
 * term ids with counts (buffers transferred). Runs as built JavaScript
 * (`dist/parallel/analyze-worker.js`).
 *
 * @module
 */

import { parentPort, workerData } from 'node:worker_threads';
import { createAnalyzer } from '../analyze/index.js';
import { TermCollector } from '../vectorize/collect.js';
import { analyzeInto, type AnalyzeWorkerInit, type ChunkReply, type ChunkRequest } from './analyze-protocol.js';

function serve(port: NonNullable<typeof parentPort>, init: AnalyzeWorkerInit): void {
  const analyzer = createAnalyzer(init.settings);
  const collector = new TermCollector();
  let reported = 0;
  port.on('message', (req: ChunkRequest) => {
    analyzeInto(analyzer, collector, req.texts, 0, req.texts.length);
    const seg = collector.take(true);
    const terms = collector.names.slice(reported);
    reported = collector.names.length;
    const reply: ChunkReply = { chunk: req.chunk, terms, rows: seg.rows, offsets: seg.offsets, entries: seg.entries };
    // take(true) makes exact copies on plain ArrayBuffers, which can be transferred.
    port.postMessage(reply, [seg.offsets.buffer as ArrayBuffer, seg.entries.buffer as ArrayBuffer]);
  });
}

if (parentPort) serve(parentPort, workerData as AnalyzeWorkerInit);
