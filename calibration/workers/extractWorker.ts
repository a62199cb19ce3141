/** Worker-thread entry: per-trace resonance extraction for one chunk of a sweep. */
import { extractSweep, type ExtractOptions, type SweepTrace, type SweepExtraction } from '../resonator';

export interface ExtractTask {
  traces: SweepTrace[];
  opts: ExtractOptions;
}

export default function extractChunk(task: ExtractTask): SweepExtraction {
  const x = extractSweep(task.traces, task.opts);
  // The per-trace fit objects are large and the caller needs only the JSON rows and the summary.
  return { traces: x.traces, results: x.results.map((r) => ({ ...r, fit: undefined })), summary: x.summary };
}
