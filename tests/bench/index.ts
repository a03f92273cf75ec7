/**
 * `npm run bench`: every benchmark in one bounded run (several minutes) — the statistics engine, the
 * seeded demo's pages beside the health route and one worker beside two, the trial API with 5,000
 * patients (evaluation, patient list, outcome writes, Needs attention, the CSV import), Portfolio
 * and Accrual, each beside its reference measured in the same run — plus the client's initial
 * JavaScript and the server's resident memory. Prints the tables and every goal of the performance
 * issue as met or not met, and writes the figures to bench-results/latest.json.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { BenchFigure, BenchGoal } from './figures.js';
import { runStatsBench } from './stats.js';
import { printDemoTable, runApiDemoBench } from './api-demo.js';
import { runApiTrialBench } from './api-trial.js';
import { runApiPortfolioBench } from './api-portfolio.js';
import { BENCH_SECONDS } from './api-load.js';
import { ROOT, allJavaScript, buildClient, initialJavaScript } from '../support/e2e-browser.js';

const round = (value: number) => (value >= 100 ? value.toFixed(0) : value >= 10 ? value.toFixed(1) : value.toFixed(2));
const kib = (bytes: number) => `${(bytes / 1024).toFixed(1)} KiB`;

function printTable(section: string, figures: BenchFigure[]) {
  console.log(`\n${section}`);
  const rows = figures.map((f) => [f.name, `${round(f.ours.value)} ${f.ours.unit}`, `${round(f.reference.value)} ${f.reference.unit}`, f.ratio.toFixed(3), f.reference.name]);
  const header = ['figure', 'ours', 'reference', 'ratio', 'reference is'];
  const widths = header.map((h, i) => Math.min(90, Math.max(h.length, ...rows.map((r) => r[i].length))));
  const line = (cells: string[]) => cells.map((c, i) => (i === 1 || i === 2 || i === 3 ? c.padStart(widths[i]) : c.padEnd(widths[i]))).join('  ');
  console.log(line(header));
  console.log(widths.map((w) => '─'.repeat(w)).join('  '));
  for (const row of rows) console.log(line(row));
  for (const f of figures) if (f.note) console.log(`  · ${f.name}: ${f.note}`);
}

async function clientSize() {
  const outDir = await buildClient();
  try {
    const initial = initialJavaScript(outDir);
    const all = allJavaScript(outDir);
    return { initialFiles: initial.files, initialBytes: initial.bytes, initialGzipBytes: initial.gzipBytes, allJsFiles: all.files, allJsBytes: all.bytes };
  } finally {
    rmSync(outDir, { recursive: true, force: true });
  }
}

const MEMORY_GOAL_MIB = 300;

const started = Date.now();
const loadAt = () => os.loadavg().map((l) => l.toFixed(2)).join(' ');
const results: Record<string, BenchFigure[]> = {};
const goals: BenchGoal[] = [];
const load: Record<string, string> = {};
console.log(`[bench] load average ${loadAt()}; statistics engine …`);
results['Statistics engine'] = await runStatsBench();
console.log(`[bench] load average ${loadAt()}; the seeded demo …`);
load['demo'] = loadAt();
const demo = await runApiDemoBench();
results['The seeded demo, production start'] = demo.figures;
console.log(`[bench] load average ${loadAt()}; one trial of 5,000 patients …`);
load['trial'] = loadAt();
const trial = await runApiTrialBench();
results['Trial API, one trial of 5,000 patients'] = trial.figures;
console.log(`[bench] load average ${loadAt()}; Portfolio and Accrual …`);
load['portfolio'] = loadAt();
const portfolio = await runApiPortfolioBench();
results['Portfolio and Accrual API'] = portfolio.figures;
load['end'] = loadAt();
const client = await clientSize();

const residentMiB = Math.max(demo.residentMiB, trial.residentMiB);
goals.push(...demo.goals, ...trial.goals, ...portfolio.goals, {
  goal: `The server's resident set after the bench ≤ ${MEMORY_GOAL_MIB} MB (the worker that served)`,
  measured: `${demo.residentMiB.toFixed(0)} MiB after the demo runs, ${trial.residentMiB.toFixed(0)} MiB after the 5,000-patient runs and the import; the cluster's primary, which only forks, ${trial.primaryMiB.toFixed(0)} MiB more`,
  met: residentMiB <= MEMORY_GOAL_MIB,
});

console.log(`\nThe seeded demo (TSY-201), one worker, rate limits lifted — load average at the start ${load['demo']}`);
printDemoTable(demo.table);
for (const [section, figures] of Object.entries(results)) printTable(section, figures);
console.log('\nClient');
console.log(`  initial JavaScript: ${kib(client.initialGzipBytes)} gzip (${kib(client.initialBytes)} raw, ${client.initialFiles.length} file(s))`);
console.log(`  all JavaScript of the build: ${kib(client.allJsBytes)} raw in ${client.allJsFiles} files (the rest loads on demand)`);

console.log(`\nGoals of the performance issue (load average: demo ${load['demo']}, trial ${load['trial']}, portfolio ${load['portfolio']}, end ${load['end']})`);
for (const g of goals) console.log(`  ${g.met ? 'met    ' : 'not met'}  ${g.goal} — ${g.measured}`);

const seconds = (Date.now() - started) / 1000;
const output = {
  generatedAt: new Date().toISOString(),
  runSeconds: Math.round(seconds),
  secondsPerLoadRun: BENCH_SECONDS,
  machine: { cpus: os.cpus().length, cpuModel: os.cpus()[0]?.model, memoryGiB: Math.round(os.totalmem() / 2 ** 30), node: process.version, loadAverage: os.loadavg() },
  loadAverageBySection: load,
  demoTable: demo.table.map(({ route, measured }) => ({ route, perSecond: measured.perSecond, p97_5: measured.p97_5, p95: measured.p95, p50: measured.p50 })),
  figures: results,
  goals,
  residentMiB: { demo: demo.residentMiB, trial: trial.residentMiB, primary: trial.primaryMiB },
  client,
};
const file = path.join(ROOT, 'bench-results', 'latest.json');
mkdirSync(path.dirname(file), { recursive: true });
writeFileSync(file, `${JSON.stringify(output, null, 2)}\n`);
console.log(`\n[bench] ${Math.round(seconds)} s in all; figures written to ${path.relative(process.cwd(), file)}`);
