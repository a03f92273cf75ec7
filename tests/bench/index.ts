/**
 * `npm run bench`: every benchmark in one bounded run (a few minutes) — the statistics engine, the
 * trial API with 5,000 patients (evaluation, patient list, outcome writes), Portfolio and Accrual,
 * each beside its reference measured in the same run — plus the client's initial JavaScript. Prints
 * a table and writes the figures to bench-results/latest.json.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { BenchFigure } from './figures.js';
import { runStatsBench } from './stats.js';
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

const started = Date.now();
const sections: Array<[string, () => Promise<BenchFigure[]>]> = [
  ['Statistics engine', runStatsBench],
  ['Trial API, one trial of 5,000 patients', runApiTrialBench],
  ['Portfolio and Accrual API', runApiPortfolioBench],
];
const results: Record<string, BenchFigure[]> = {};
for (const [section, run] of sections) {
  console.log(`[bench] ${section} …`);
  results[section] = await run();
}
const client = await clientSize();

for (const [section, figures] of Object.entries(results)) printTable(section, figures);
console.log('\nClient');
console.log(`  initial JavaScript: ${kib(client.initialGzipBytes)} gzip (${kib(client.initialBytes)} raw, ${client.initialFiles.length} file(s))`);
console.log(`  all JavaScript of the build: ${kib(client.allJsBytes)} raw in ${client.allJsFiles} files (the rest loads on demand)`);

const seconds = (Date.now() - started) / 1000;
const output = {
  generatedAt: new Date().toISOString(),
  runSeconds: Math.round(seconds),
  secondsPerLoadRun: BENCH_SECONDS,
  machine: { cpus: os.cpus().length, cpuModel: os.cpus()[0]?.model, memoryGiB: Math.round(os.totalmem() / 2 ** 30), node: process.version, loadAverage: os.loadavg() },
  figures: results,
  client,
};
const file = path.join(ROOT, 'bench-results', 'latest.json');
mkdirSync(path.dirname(file), { recursive: true });
writeFileSync(file, `${JSON.stringify(output, null, 2)}\n`);
console.log(`\n[bench] ${Math.round(seconds)} s in all; figures written to ${path.relative(process.cwd(), file)}`);
