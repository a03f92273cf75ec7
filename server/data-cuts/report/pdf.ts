/**
 * The PDF report of a data cut: trial and design, the cut's counts and hash, every analysis as a
 * table, the boundary chart drawn with vector lines, the safety section (adverse events by grade
 * and attribution, toxicities against the locked rule), the cautions, and the committee's signed
 * recommendations and applied decisions. Built from the same analysis object the API returns, so
 * its figures are the engine's, and worded by the words module, so it reads as the pages do. Set in
 * the shipped Inter, embedded (fonts.ts), so α, β, ≤ and θ print as themselves. Every page carries
 * its number and the decision-support caution in a running footer; the first page states the
 * caution in full. Deterministic: the document's dates come from the cut's time and the embedded
 * subsets are named from their content, so the same content gives the same bytes (and hash).
 */
import type { AppliedDecision, DataCut, Recommendation } from '../data-cuts.repository.js';
import type { CohortAnalysis } from '../analysis.js';
import type { CutAnalysis } from '../data-cuts.service.js';
import {
  ATTRIBUTION_WORDS,
  CTCAE_SOURCE,
  CUT_KIND_LABELS,
  DECISION_SUPPORT_ONLY,
  DECISION_WORDS,
  GRADE_WORDS,
  METHOD_NAMES,
  OPEN_ISSUE_WORDS,
  POPULATION_COUNTS,
  RECOMMENDATION_WORDS,
  REPORT_FOOTER_CAUTION,
  SAFETY_RULE_WORDS,
  SELECTION_LABELS,
  SENSITIVITY_LABEL,
  SETTLED_EARLY,
  STATUS_WORDS,
  STOP_CATEGORY_LABELS,
  VERDICT_WORDS,
  ruleLabel,
  type Worded,
} from '../../words/index.js';
import { reportFonts } from './fonts.js';
import type { CohortSafetyAnalysis } from '../safety-analysis.js';

export type ReportInput = {
  cut: DataCut;
  analysis: CutAnalysis;
  recommendations: Recommendation[];
  decisions: AppliedDecision[];
  committeeSize: number;
};

const INK = '#14213d';
const MUTED = '#5b6478';
const BRASS = '#9a7b2f';
const RULE = '#c9ccd3';
const OBSERVED = '#3a5a8c';
const PAGE_BOTTOM = 770;
const PAGE_HEIGHT = 841.89;
const LEFT = 50;
const WIDTH = 495;
/** A large trial's issues would fill dozens of pages; the rest are in the export. */
const ISSUES_LISTED = 200;
const REGULAR = 'Inter';
const SEMIBOLD = 'Inter-SemiBold';

/** Fixed-digit figures, as the report prints them (the API carries full precision). */
export const fig = {
  pct: (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${(v * 100).toFixed(1)}%`),
  p: (v: number | null | undefined) => (v === null || v === undefined ? '—' : v < 0.0001 ? '< 0.0001' : v.toFixed(4)),
  dec: (v: number | null | undefined, d = 3) => (v === null || v === undefined ? '—' : v.toFixed(d)),
  ci: (ci: [number, number] | null | undefined) => (ci ? `${(ci[0] * 100).toFixed(1)}% to ${(ci[1] * 100).toFixed(1)}%` : '—'),
};

/** A status stored on a decision, as a label. */
const statusLabel = (status: string) => (STATUS_WORDS[status as keyof typeof STATUS_WORDS]?.label ?? 'another status').toLowerCase();

/** A label with its glyph, as the pages show it. */
const worded = (w: Worded) => `${w.glyph} ${w.label}`;

type Doc = PDFKit.PDFDocument;

/** Each document's way of keeping text to the characters Inter draws. */
const printables = new WeakMap<Doc, (text: string) => string>();
const printable = (doc: Doc, text: string) => (printables.get(doc) as (text: string) => string)(text);

function ensureSpace(doc: Doc, height: number) {
  if (doc.y + height > PAGE_BOTTOM) doc.addPage();
}

function heading(doc: Doc, text: string, size = 12) {
  ensureSpace(doc, 40);
  doc.moveDown(0.6).font(SEMIBOLD).fontSize(size).fillColor(INK).text(printable(doc, text), LEFT, doc.y, { width: WIDTH });
  doc.moveTo(LEFT, doc.y + 2).lineTo(LEFT + WIDTH, doc.y + 2).lineWidth(0.5).strokeColor(BRASS).stroke();
  doc.moveDown(0.4);
}

function paragraph(doc: Doc, text: string, options: { size?: number; color?: string; bold?: boolean } = {}) {
  const size = options.size ?? 9;
  const shown = printable(doc, text);
  doc.font(options.bold ? SEMIBOLD : REGULAR).fontSize(size).fillColor(options.color ?? INK);
  ensureSpace(doc, doc.heightOfString(shown, { width: WIDTH }) + 4);
  doc.text(shown, LEFT, doc.y, { width: WIDTH });
  doc.moveDown(0.25);
}

/** The decision-support caution in a ruled box: the first thing the report says after its title. */
function cautionBox(doc: Doc) {
  const text = printable(doc, DECISION_SUPPORT_ONLY);
  doc.font(SEMIBOLD).fontSize(9);
  const height = doc.heightOfString(text, { width: WIDTH - 16 }) + 12;
  const top = doc.y;
  doc.rect(LEFT, top, WIDTH, height).lineWidth(0.8).strokeColor(BRASS).stroke();
  doc.fillColor(INK).text(text, LEFT + 8, top + 6, { width: WIDTH - 16 });
  doc.x = LEFT;
  doc.y = top + height + 6;
}

/** Page numbers and the decision-support caution at the foot of every page, once all pages exist. */
function runningFooters(doc: Doc, title: string) {
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    // Writing below the bottom margin would otherwise start a new page.
    doc.page.margins.bottom = 0;
    const y = PAGE_HEIGHT - 38;
    doc.moveTo(LEFT, y - 4).lineTo(LEFT + WIDTH, y - 4).lineWidth(0.3).strokeColor(RULE).stroke();
    doc.font(REGULAR).fontSize(7).fillColor(MUTED);
    doc.text(printable(doc, REPORT_FOOTER_CAUTION), LEFT, y, { width: WIDTH - 90, lineBreak: false });
    doc.text(`Page ${i - range.start + 1} of ${range.count}`, LEFT + WIDTH - 90, y, { width: 90, align: 'right', lineBreak: false });
    doc.text(printable(doc, title), LEFT, y + 10, { width: WIDTH, lineBreak: false });
    doc.page.margins.bottom = bottom;
  }
}

/** A plain ruled table: first row is the header; columns share the width by the given weights. */
function table(doc: Doc, rows: string[][], weights?: number[]) {
  const columns = rows[0].length;
  const w = weights ?? Array(columns).fill(1);
  const total = w.reduce((s, v) => s + v, 0);
  const widths = w.map((v) => (v / total) * WIDTH);
  rows.forEach((row, index) => {
    doc.font(index === 0 ? SEMIBOLD : REGULAR).fontSize(8);
    const cells = row.map((cell) => printable(doc, cell));
    const height = Math.max(...cells.map((cell, i) => doc.heightOfString(cell, { width: widths[i] - 6 }))) + 5;
    if (doc.y + height > PAGE_BOTTOM) doc.addPage();
    const top = doc.y;
    let x = LEFT;
    cells.forEach((cell, i) => {
      doc.fillColor(index === 0 ? MUTED : INK).text(cell, x + 3, top + 2.5, { width: widths[i] - 6, lineBreak: true });
      x += widths[i];
    });
    doc.moveTo(LEFT, top + height).lineTo(LEFT + WIDTH, top + height).lineWidth(index === 0 ? 0.8 : 0.3).strokeColor(RULE).stroke();
    doc.y = top + height;
  });
  doc.x = LEFT;
  doc.moveDown(0.4);
}

/** One boundary's steps as separate segments: a gap (no boundary yet) or the end of stage 1 starts a new one. */
export function boundarySegments(points: Array<{ decided: number; value: number | null }>, n1: number | null): Array<Array<{ decided: number; value: number }>> {
  const segments: Array<Array<{ decided: number; value: number }>> = [];
  let current: Array<{ decided: number; value: number }> = [];
  for (const point of points) {
    const crossesStage = n1 !== null && point.decided === n1 + 1;
    if (point.value === null || crossesStage) {
      if (current.length > 0) segments.push(current);
      current = [];
    }
    if (point.value !== null) current.push({ decided: point.decided, value: point.value });
  }
  if (current.length > 0) segments.push(current);
  return segments;
}

/**
 * Responders against decided patients, with the boundaries, in vector lines. In stage 1 the upper
 * line only passes the stage (more than r1); the promising boundary (more than r) belongs to the
 * final analysis. The futility boundary is drawn stage by stage, never joined across the interim.
 */
function boundaryChart(doc: Doc, cohort: CohortAnalysis) {
  if (!cohort.design || cohort.boundaries.length === 0) return;
  const design = cohort.design;
  const height = 210;
  ensureSpace(doc, height + 50);
  const top = doc.y + 6;
  const plot = { x: LEFT + 36, y: top, w: WIDTH - 150, h: height - 30 };
  const nMax = Math.max(design.n, cohort.path.length);
  const yMax = Math.max(design.r + 2, ...cohort.path.map((p) => p.responders + 1));
  const X = (k: number) => plot.x + (k / nMax) * plot.w;
  const Y = (r: number) => plot.y + plot.h - (r / yMax) * plot.h;

  doc.lineWidth(0.6).strokeColor(MUTED).undash();
  doc.moveTo(plot.x, plot.y).lineTo(plot.x, plot.y + plot.h).lineTo(plot.x + plot.w, plot.y + plot.h).stroke();
  doc.font(REGULAR).fontSize(7).fillColor(MUTED);
  const xStep = Math.max(1, Math.ceil(nMax / 10));
  for (let k = 0; k <= nMax; k += xStep) {
    doc.moveTo(X(k), plot.y + plot.h).lineTo(X(k), plot.y + plot.h + 3).stroke();
    doc.text(String(k), X(k) - 10, plot.y + plot.h + 5, { width: 20, align: 'center' });
  }
  const yStep = Math.max(1, Math.ceil(yMax / 8));
  for (let r = 0; r <= yMax; r += yStep) {
    doc.moveTo(plot.x - 3, Y(r)).lineTo(plot.x, Y(r)).stroke();
    doc.text(String(r), plot.x - 26, Y(r) - 3, { width: 20, align: 'right' });
  }
  doc.text('Decided patients', plot.x, plot.y + plot.h + 15, { width: plot.w, align: 'center' });
  doc.save().rotate(-90, { origin: [LEFT + 4, plot.y + plot.h / 2] }).text('Responders', LEFT - 26, plot.y + plot.h / 2 - 4, { width: 60, align: 'center' }).restore();

  const n1 = design.r1 !== null ? design.n1 : null;
  const stepLine = (segment: Array<{ decided: number; value: number }>) => {
    segment.forEach((point, i) => {
      if (i === 0) doc.moveTo(X(point.decided - 1), Y(point.value));
      else doc.lineTo(X(point.decided - 1), Y(point.value));
      doc.lineTo(X(point.decided), Y(point.value));
    });
    doc.stroke();
  };
  const futilityStyle = () => doc.lineWidth(1.2).strokeColor(INK).undash();
  const passStyle = () => doc.lineWidth(1.2).strokeColor(BRASS).dash(1.5, { space: 2 });
  const promisingStyle = () => doc.lineWidth(1.2).strokeColor(BRASS).dash(4, { space: 3 });

  for (const segment of boundarySegments(cohort.boundaries.map((b) => ({ decided: b.evaluable, value: b.futility })), n1)) {
    futilityStyle();
    stepLine(segment);
  }
  const upper = cohort.boundaries.map((b) => ({ decided: b.evaluable, value: b.success }));
  for (const segment of boundarySegments(upper, n1)) {
    if (n1 !== null && segment[0].decided <= n1) passStyle();
    else promisingStyle();
    stepLine(segment);
  }
  doc.undash();
  if (n1 !== null) {
    doc.lineWidth(0.5).strokeColor(MUTED).dash(1, { space: 2 });
    doc.moveTo(X(n1), plot.y).lineTo(X(n1), plot.y + plot.h).stroke().undash();
    doc.fontSize(7).fillColor(MUTED).text('end of stage 1', X(n1) + 2, plot.y + 2, { width: 60 });
  }
  // Observed path: thin line with dots.
  if (cohort.path.length > 0) {
    doc.lineWidth(0.9).strokeColor(OBSERVED).undash().moveTo(X(0), Y(0));
    for (const p of cohort.path) doc.lineTo(X(p.evaluable), Y(p.responders));
    doc.stroke();
    doc.fillColor(OBSERVED);
    for (const p of cohort.path) doc.circle(X(p.evaluable), Y(p.responders), 1.6).fill();
  }
  const legendX = plot.x + plot.w + 14;
  const legend: Array<[string, () => void]> = [
    [
      n1 !== null
        ? 'Futility boundary (solid): at or below it, stage 1 meets the futility rule, or the final result can no longer be promising'
        : 'Futility boundary (solid): at or below it, the result can no longer be promising',
      futilityStyle,
    ],
    ...(n1 !== null ? [['Stage 1 passed (dotted): at or above r1 + 1, the cohort may go on to stage 2; this settles nothing about the final result', passStyle] as [string, () => void]] : []),
    ['Promising (dashed): at or above r + 1 at the final analysis, the result is promising', promisingStyle],
    ['Observed responders (dots), in enrolment order', () => doc.lineWidth(0.9).strokeColor(OBSERVED).undash()],
  ];
  let legendY = plot.y + 4;
  for (const [label, style] of legend) {
    style();
    doc.moveTo(legendX, legendY + 4).lineTo(legendX + 18, legendY + 4).stroke().undash();
    doc.font(REGULAR).fontSize(7).fillColor(INK).text(label, legendX + 22, legendY, { width: 92 });
    legendY = doc.y + 6;
  }
  doc.x = LEFT;
  doc.y = top + height + 8;
}

function designLine(c: CohortAnalysis): string {
  const d = c.design;
  if (!d) return 'No locked design at the cut.';
  const rule = d.r1 !== null ? `stage 1: stop for futility if ≤ ${d.r1} responders among ${d.n1}; final: promising if > ${d.r} among ${d.n}` : `promising if > ${d.r} among ${d.n}`;
  return `${SELECTION_LABELS[d.selection]} design, version ${d.version}: p0 ${d.p0}, p1 ${d.p1}, α ${d.alpha}, β ${d.beta}; ${rule}; type I error ${fig.dec(d.typeIError, 4)}, power ${fig.dec(d.power, 4)}; ${POPULATION_COUNTS[d.analysisPopulation]}.`;
}

function cohortSection(doc: Doc, c: CohortAnalysis) {
  heading(doc, `Cohort ${c.code} — ${c.name} (at the cut: ${worded(STATUS_WORDS[c.statusAtCut as keyof typeof STATUS_WORDS])})`);
  paragraph(doc, designLine(c));
  if (!c.design || !c.counts) return;
  const t = c.counts;
  table(doc, [
    ['Enrolled', 'Counted', 'Decided', 'Responders', 'Pending', 'Not evaluable', 'Stage 1 (responders/decided)', 'Stage 2 (responders/decided)'],
    [t.enrolled, t.counted, t.decided, t.responders, t.pending, t.notEvaluable, `${t.stage1.responders}/${t.stage1.decided}`, `${t.stage2.responders}/${t.stage2.decided}`].map(String),
  ]);
  if (c.responseRate) {
    const rr = c.responseRate;
    table(
      doc,
      [
        ['Response rate', 'Clopper–Pearson 95%', 'Wilson 95%', 'Jeffreys 95%', 'Exact one-sided p (vs p0)'],
        [`${rr.responders}/${rr.decided} = ${fig.pct(rr.estimate)}`, fig.ci(rr.clopperPearson), fig.ci(rr.wilson), fig.ci(rr.jeffreys), fig.p(c.exactTest?.pValue)],
      ],
      [1.3, 1.3, 1.3, 1.3, 1.2],
    );
  } else {
    paragraph(doc, 'No decided outcome yet: no response rate.');
  }
  if (c.rule) {
    paragraph(doc, `${ruleLabel(c.rule, c.design?.r1 === null)}: ${worded(VERDICT_WORDS[c.rule.decision])}${c.rule.determinedEarly ? ` (${SETTLED_EARLY})` : ''}. ${c.rule.message}`);
    if (c.rule.atRiskNote) paragraph(doc, c.rule.atRiskNote);
  }
  if (c.inference) {
    const inf = c.inference;
    paragraph(doc, 'Inference after the two-stage design', { bold: true });
    table(doc, [
      ['', 'Estimate', '95% interval', 'p-value'],
      ['Stage-wise ordering over the attained design, with UMVUE (primary)', fig.pct(inf.umvue), fig.ci(inf.ci), fig.p(inf.pValue)],
      ...(inf.sensitivity ? [[SENSITIVITY_LABEL, '—', '—', fig.p(inf.sensitivity.pValue)]] : []),
      ['Naive (ignores the stopping rule — biased)', fig.pct(inf.naiveEstimate), fig.ci(inf.naiveCi), fig.p(c.exactTest?.pValue)],
    ], [2.2, 1, 1.6, 1]);
    if (inf.note) paragraph(doc, inf.note, { color: MUTED });
    if (c.rule?.sensitivityNote) paragraph(doc, c.rule.sensitivityNote, { color: BRASS });
  } else if (c.inferenceNote) {
    paragraph(doc, c.inferenceNote, { color: MUTED });
  }
  if (c.bayes) {
    table(doc, [
      ['Prior', 'θT', 'nmax', 'Posterior P(p > p0)', 'Predictive probability of success'],
      [`Beta(${fig.dec(c.bayes.prior.a)}, ${fig.dec(c.bayes.prior.b)}) ${c.bayes.prior.source}`, fig.dec(c.bayes.thetaT, 2), String(c.bayes.nmax), fig.dec(c.bayes.posteriorProbability, 4), fig.dec(c.bayes.predictiveProbability, 4)],
    ], [1.8, 0.7, 0.7, 1.3, 1.6]);
  }
  if (c.sites.length > 0) {
    paragraph(doc, 'Response by site', { bold: true });
    table(doc, [
      ['Site', 'Enrolled', 'Decided', 'Responders', 'Rate', 'Exact 95% interval'],
      ...c.sites.map((s) => [s.siteCode, String(s.enrolled), String(s.decided), String(s.responders), fig.pct(s.estimate), fig.ci(s.ci)]),
    ]);
    if (c.heterogeneity) {
      paragraph(
        doc,
        `Heterogeneity across ${c.heterogeneity.sites} sites: chi-square ${fig.dec(c.heterogeneity.chiSquare, 3)} on ${c.heterogeneity.df} df, p ${fig.p(c.heterogeneity.pValueChiSquare)}; exact (Fisher / Freeman–Halton) p ${fig.p(c.heterogeneity.pValueExact)}.`,
      );
    }
    if (c.heterogeneityNote) paragraph(doc, c.heterogeneityNote, { color: MUTED });
  }
  if (c.deviation) {
    const dv = c.deviation;
    paragraph(doc, 'Attained size differs from the design', { bold: true });
    const oc = dv.applied.characteristics;
    const d = c.design;
    table(doc, [
      ['Rule', 'r1/n1', 'r/n', 'Type I error', 'Power', 'PET0', 'EN0'],
      ['Planned', d.n1 !== null ? `${d.r1}/${d.n1}` : '-', `${d.r}/${d.n}`, fig.dec(d.typeIError, 4), fig.dec(d.power, 4), fig.dec(d.pet0, 4), fig.dec(d.en0, 1)],
      [
        'As applied (thresholds for the attained sizes)',
        dv.attainedN1 !== null ? `${dv.applied.r1}/${dv.attainedN1}` : '-',
        `${dv.applied.r}/${dv.attainedN}`,
        ...(oc ? [fig.dec(oc.typeIError, 4), fig.dec(oc.power, 4), fig.dec(oc.pet0, 4), fig.dec(oc.en0, 1)] : ['-', '-', '-', '-']),
      ],
    ], [2.4, 0.8, 0.8, 1, 1, 0.8, 0.8]);
    paragraph(doc, dv.method, { size: 7.5, color: MUTED });
    if (dv.applied.note) paragraph(doc, dv.applied.note, { color: MUTED });
  }
  paragraph(doc, `Responders resting on derived outcomes: ${c.responderSources.derived}; on entered outcomes: ${c.responderSources.entered}.`);
  boundaryChart(doc, c);
  for (const caution of c.cautions) paragraph(doc, `Caution: ${caution}`, { color: BRASS });
}

/** A cohort's safety at the cut: events by grade and attribution, the toxicity rate, the rule's state and the joint verdict. */
function safetySection(doc: Doc, s: CohortSafetyAnalysis) {
  heading(doc, `Safety — cohort ${s.code} (${SAFETY_RULE_WORDS[s.safetyRule]})`);
  for (const sentence of s.sentences) paragraph(doc, sentence);
  if (!s.eventsFrozen) return;
  paragraph(doc, `${s.events.total} adverse events in ${s.events.patients} patients, ${s.events.serious} serious. Grades: ${CTCAE_SOURCE}.`, { color: MUTED });
  if (s.events.total > 0) {
    const attributions = Object.keys(ATTRIBUTION_WORDS) as Array<keyof typeof ATTRIBUTION_WORDS>;
    table(doc, [
      ['Grade', ...attributions.map((a) => ATTRIBUTION_WORDS[a]), 'Not assessed', 'All', 'Serious'],
      ...s.events.byGrade.map((row) => [
        row.grade === null ? 'Not graded' : `${row.grade} ${GRADE_WORDS[row.grade]}`,
        ...attributions.map((a) => String(row.byAttribution[a])),
        String(row.byAttribution.not_assessed),
        String(row.total),
        String(row.serious),
      ]),
    ], [1.4, 1, 1, 1, 1, 1, 1, 0.7, 0.7]);
  }
  if (s.counts) {
    table(doc, [
      ['Enrolled', 'Toxicities', 'No toxicity', 'Not yet assessable', 'Toxicity rate', `${Math.round((s.toxicityRate?.confLevel ?? 0.95) * 100)}% exact interval`],
      [String(s.counts.enrolled), String(s.counts.toxic), String(s.counts.notToxic), String(s.counts.notAssessable), fig.pct(s.toxicityRate?.estimate), fig.ci(s.toxicityRate?.ci)],
    ]);
  }
  if (s.toxicPatients.length > 0) paragraph(doc, `Patients counted as toxicities: ${s.toxicPatients.join(', ')}.`, { color: MUTED });
}

export async function renderCutReport(input: ReportInput): Promise<Buffer> {
  const { cut, analysis } = input;
  const cutAt = new Date(cut.cutAt);
  // The PDF library (about 15 MB resident) loads with the first report, not with every server process.
  const { default: PDFDocument } = await import('pdfkit');
  const fonts = await reportFonts();
  const title = `${analysis.trial.code} — data cut ${cut.seq} (${CUT_KIND_LABELS[cut.kind].toLowerCase()})`;
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: 50, bottom: 60, left: LEFT, right: 50 },
    bufferPages: true,
    info: {
      Title: title,
      Author: 'Orrery',
      Subject: CUT_KIND_LABELS[cut.kind],
      Creator: 'Orrery',
      Producer: 'Orrery',
      CreationDate: cutAt,
      ModDate: cutAt,
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const finished = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  doc.registerFont(REGULAR, fonts.regular);
  doc.registerFont(SEMIBOLD, fonts.semibold);
  printables.set(doc, fonts.printable);

  doc.font(SEMIBOLD).fontSize(18).fillColor(INK).text(printable(doc, title), LEFT, 50);
  doc.font(REGULAR).fontSize(10).fillColor(MUTED).text(printable(doc, `${analysis.trial.title} — ${analysis.trial.indication}${analysis.trial.sponsorName ? ` — sponsor ${analysis.trial.sponsorName}` : ''}`));
  doc.moveDown(0.6);
  cautionBox(doc);
  paragraph(doc, `Cut at ${cut.cutAt} (UTC). Content hash (SHA-256 of the frozen snapshot): ${cut.contentHash}. Snapshot intact when this report was made: ${analysis.integrity.intact ? 'yes' : 'NO — the frozen copy no longer matches its hash'}.`);
  table(doc, [
    ['Patients', 'Pending outcomes', 'Unattested outcomes', 'Outcome flags', 'Not evaluable'],
    [cut.counts.patients, cut.counts.pending, cut.counts.unattested, cut.counts.flagged, cut.counts.notEvaluable].map(String),
  ]);
  paragraph(doc, `Prior for the Bayesian figures: ${analysis.prior.statement}`, { color: MUTED });

  for (const cohort of analysis.cohorts) cohortSection(doc, cohort);

  if (analysis.multiplicity) {
    heading(doc, 'Across cohorts: adjusted p-values');
    table(doc, [
      ['Cohort', 'p0', 'p-value', 'Holm', 'Benjamini–Hochberg'],
      ...analysis.multiplicity.rows.map((r) => [r.code, String(r.p0), `${fig.p(r.pValue)} (${r.basis === 'stage-wise' ? 'stage-wise' : 'exact binomial'})`, fig.p(r.holm), fig.p(r.bh)]),
    ]);
  }

  for (const safety of analysis.safety) safetySection(doc, safety);

  heading(doc, `Open data issues at the cut (${analysis.openIssues.length})`);
  if (analysis.openIssues.length === 0) paragraph(doc, 'None.');
  else {
    const listed = analysis.openIssues.slice(0, ISSUES_LISTED);
    table(doc, [['Study ID', 'Site', 'Cohort', 'Issue', 'Detail'], ...listed.map((i) => [i.studyId, i.siteCode, i.cohortCode, worded(OPEN_ISSUE_WORDS[i.issue]), i.detail])], [1, 0.7, 0.8, 1.3, 2.5]);
    const rest = analysis.openIssues.length - listed.length;
    if (rest > 0) paragraph(doc, `… and ${rest} more: every issue is in the analysis and in the patients export of this cut.`, { color: MUTED });
  }

  heading(doc, 'Cautions');
  for (const caution of analysis.cautions) paragraph(doc, `• ${caution}`);

  heading(doc, 'How verdicts are reached');
  analysis.rulesStatement.forEach((rule, i) => paragraph(doc, `${i + 1}. ${rule}`));

  heading(doc, `Committee recommendations (${input.recommendations.length} of ${input.committeeSize} members signed)`);
  if (input.recommendations.length === 0) paragraph(doc, 'No recommendation signed yet.');
  for (const r of input.recommendations) {
    paragraph(doc, `${worded(RECOMMENDATION_WORDS[r.decision])} — ${r.memberName ?? r.memberEmail}`, { bold: true });
    paragraph(doc, `Rationale: ${r.rationale}`);
    paragraph(doc, `Electronic signature ${r.signature.id}: "${r.signature.meaning}" Signed ${r.signature.signedAt} by ${r.signature.signerEmail} after a fresh sign-in at ${r.signature.authenticatedAt}; content hash ${r.signature.contentHash}.`, { size: 7.5, color: MUTED });
  }
  if (input.decisions.length > 0) {
    heading(doc, 'Decisions applied');
    for (const d of input.decisions) {
      paragraph(
        doc,
        `Cohort ${d.cohortCode}: ${worded(DECISION_WORDS[d.action])}${d.stopCategory ? ` (${STOP_CATEGORY_LABELS[d.stopCategory as keyof typeof STOP_CATEGORY_LABELS] ?? STOP_CATEGORY_LABELS.other})` : ''} — from ${statusLabel(d.fromStatus)} to ${statusLabel(d.toStatus)}, applied ${d.appliedAt} by ${d.appliedByName ?? 'a statistician'}. Reason: ${d.reason}`,
      );
    }
  }
  paragraph(doc, 'Methods', { bold: true });
  for (const [name, text] of Object.entries(analysis.methods)) paragraph(doc, `${METHOD_NAMES[name] ?? 'Method'}: ${text}`, { size: 7.5, color: MUTED });
  runningFooters(doc, title);
  doc.end();
  return finished;
}
