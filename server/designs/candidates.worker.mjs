/**
 * Worker thread for the design searches (candidates.ts, safety-candidates.ts): a search near the
 * largest nmax can take a second or two, which must not stall every other request on the server's
 * event loop.
 */
import { parentPort } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

const { designCandidates, chosenDesign } = await tsImport('./candidates.ts', import.meta.url);
const { safetyDesigns, bryantDayChoice, bryantDayGrid } = await tsImport('./safety-candidates.ts', import.meta.url);

const jobs = {
  candidates: (args) => designCandidates(args.settings),
  chosen: (args) => chosenDesign(args.settings, args.selection, args.admissibleIndex),
  safetyDesigns: (args) => safetyDesigns(args.settings),
  bryantDayChoice: (args) => bryantDayChoice(args.settings, args.selection),
  bryantDayGrid: (args) => bryantDayGrid(args.input),
};

parentPort.on('message', ({ id, job, args }) => {
  try {
    parentPort.postMessage({ id, result: jobs[job](args) });
  } catch (error) {
    // Typed errors cross the thread boundary as plain data and are rebuilt on the other side.
    const fields = error?.extra?.fields;
    parentPort.postMessage({ id, error: { name: error?.name, message: String(error?.message ?? error), field: error?.field, fields } });
  }
});
parentPort.postMessage({ ready: true });
