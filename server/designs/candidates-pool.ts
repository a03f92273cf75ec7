/**
 * Runs the design search in one long-lived worker thread, one job at a time, so the event loop stays
 * free while it computes. A job that overruns its limit ends the worker (the next job starts a new one).
 */
import { Worker } from 'node:worker_threads';
import { AppError, InputError } from '../http/errors.js';
import { StatsInputError } from '../stats/index.js';
import type { DesignSettingsInput, Selection } from './designs.schema.js';
import type { DesignCandidates, DesignNumbers } from './candidates.js';
import type { BryantDayCharacteristicsInput, SafetyDesignSettings } from '../safety/index.js';
import type { BryantDayDesign } from '../stats/index.js';
import type { BryantDayChoice, BryantDayGrid } from './safety-candidates.js';

/** Far above the slowest search the input bounds allow (about 2 s), so only a fault reaches it. */
const JOB_LIMIT_MS = 30_000;

type Pending = { resolve: (value: unknown) => void; reject: (error: Error) => void; timer: NodeJS.Timeout };
type WorkerError = { name?: string; message: string; field?: string; fields?: Record<string, string> };

let worker: Worker | undefined;
let nextId = 1;
const pending = new Map<number, Pending>();

/** A job is done: once none is left, the worker no longer holds the process open. */
function settle(id: number) {
  pending.delete(id);
  if (pending.size === 0) worker?.unref();
}

function failAll(error: Error) {
  for (const [id, job] of pending) {
    clearTimeout(job.timer);
    job.reject(error);
    settle(id);
  }
}

function rebuild(error: WorkerError): Error {
  if (error.name === 'StatsInputError' && error.field) return new StatsInputError(error.field, error.message);
  if (error.fields) return new InputError(error.message, error.fields);
  return new Error(error.message);
}

function getWorker(): Worker {
  if (worker) return worker;
  const started = new Worker(new URL('./candidates.worker.mjs', import.meta.url));
  started.on('message', (message: { id?: number; result?: unknown; error?: WorkerError }) => {
    const job = message.id === undefined ? undefined : pending.get(message.id);
    if (!job || message.id === undefined) return;
    settle(message.id);
    clearTimeout(job.timer);
    if (message.error) job.reject(rebuild(message.error));
    else job.resolve(message.result);
  });
  const forget = (error: Error) => {
    if (worker === started) worker = undefined;
    failAll(error);
  };
  started.on('error', forget);
  started.on('exit', () => forget(new Error('The design search worker stopped.')));
  // An idle worker must never keep a stopping process alive (listeners re-reference it, so unref last).
  started.unref();
  worker = started;
  return started;
}

type Job = 'candidates' | 'chosen' | 'safetyDesigns' | 'bryantDayChoice' | 'bryantDayGrid';

function run<T>(job: Job, args: unknown): Promise<T> {
  const id = nextId++;
  const target = getWorker();
  return new Promise<T>((resolve, reject) => {
    const timer = setTimeout(() => {
      settle(id);
      reject(new AppError(503, 'search_timeout', 'The design search took too long. Try a smaller nmax.'));
      void target.terminate();
    }, JOB_LIMIT_MS);
    timer.unref();
    pending.set(id, { resolve: resolve as (value: unknown) => void, reject, timer });
    target.ref();
    target.postMessage({ id, job, args });
  });
}

export function runDesignCandidates(settings: DesignSettingsInput): Promise<DesignCandidates> {
  return run('candidates', { settings });
}

export function runChosenDesign(settings: DesignSettingsInput, selection: Selection, admissibleIndex: number | null): Promise<DesignNumbers> {
  return run('chosen', { settings, selection, admissibleIndex });
}

/** The Bryant–Day optimal and minimax designs (400 naming nmax when there are none). */
export function runSafetyDesigns(settings: SafetyDesignSettings): Promise<{ optimal: BryantDayDesign; minimax: BryantDayDesign }> {
  return run('safetyDesigns', { settings });
}

export function runBryantDayChoice(settings: SafetyDesignSettings, selection: 'optimal' | 'minimax'): Promise<BryantDayChoice> {
  return run('bryantDayChoice', { settings, selection });
}

export function runBryantDayGrid(input: BryantDayCharacteristicsInput): Promise<BryantDayGrid> {
  return run('bryantDayGrid', { input });
}
