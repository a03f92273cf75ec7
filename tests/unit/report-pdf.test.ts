/**
 * The data cut's PDF report, rendered from an analysis of invented patients (no database): it is set
 * in the shipped Inter, embedded, so α, β, ≤ and θ print as themselves; every page has its number
 * and the decision-support caution in its footer, and the first page states the caution in full;
 * codes never reach the text; and the boundary chart's futility line is drawn stage by stage.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyseCut } from '../../server/data-cuts/analysis.js';
import { boundarySegments, renderCutReport, type ReportInput } from '../../server/data-cuts/report/pdf.js';
import type { CutDesign, DataCut } from '../../server/data-cuts/data-cuts.repository.js';
import type { CutPatient } from '../../server/data-cuts/cut-patients.repository.js';
import { DECISION_SUPPORT_ONLY, REPORT_FOOTER_CAUTION } from '../../server/words/index.js';
import { embeddedFonts, namedFonts, pdfPages } from '../support/pdf-text.js';
import { rawCodesIn } from '../support/raw-codes.js';

// Simon optimal for p0 0.20, p1 0.40, α 0.05, β 0.20: 3/13, 12/43 (Simon 1989, Table 1).
const DESIGN: CutDesign = {
  id: 'd-1',
  version: 1,
  selection: 'optimal',
  p0: 0.2,
  p1: 0.4,
  alpha: 0.05,
  beta: 0.2,
  nmax: 60,
  r1: 3,
  n1: 13,
  r: 12,
  n: 43,
  en0: 20.6,
  pet0: 0.747,
  typeIError: 0.0492,
  power: 0.8035,
  analysisPopulation: 'all_enrolled',
  interimAccrual: 'pause',
  sponsorSeesResponse: false,
  protocolReference: 'INV-PRT v1.0',
};

function patient(seq: number, outcome: CutPatient['outcome']): CutPatient {
  return {
    patientId: `p-${seq}`,
    studyId: `INV-${seq}`,
    siteId: seq % 2 ? 's-a' : 's-b',
    siteCode: seq % 2 ? 'INA' : 'INB',
    cohortId: 'c-1',
    cohortCode: 'MAIN',
    stage: 1,
    enrolmentSeq: seq,
    enrolledOn: '2026-03-02',
    outcome,
    bestOverallResponse: outcome === 'responder' ? 'PR' : outcome === 'non_responder' ? 'SD' : null,
    responseAssessedOn: outcome === 'pending' ? null : '2026-05-04',
    evaluable: true,
    notEvaluableReason: null,
    attested: seq > 2,
    attestationSignatureId: null,
    derivedBestOverallResponse: null,
    derivedResponder: null,
    outcomeFlag: null,
    patientVersion: 1,
    assessments: [],
  };
}

function reportInput(): ReportInput {
  // 4 responders among the 13 of stage 1 (the futility rule needs 3 or fewer), and one more patient pending.
  const patients = Array.from({ length: 14 }, (_, i) => patient(i + 1, i === 13 ? 'pending' : i % 3 === 0 && i < 12 ? 'responder' : 'non_responder'));
  const cut: DataCut = {
    id: '00000000-0000-4000-8000-000000000001',
    trialId: 't-1',
    cohortId: 'c-1',
    seq: 1,
    kind: 'interim',
    designVersionId: 'd-1',
    analysisVersionId: 'av-1',
    snapshot: {
      trial: { id: 't-1', code: 'INV-301', title: 'An invented trial', indication: 'Invented indication', sponsorName: 'Invented Sponsor' },
      cohorts: [{ id: 'c-1', code: 'MAIN', name: 'All patients', status: 'interim_review', design: DESIGN }],
    },
    cutAt: '2026-06-01T10:00:00.000Z',
    createdBy: null,
    contentHash: 'a'.repeat(64),
    counts: { patients: 14, pending: 1, unattested: 2, flagged: 0, notEvaluable: 0 },
    reportHash: null,
    prior: { a: null, b: null, thetaT: 0.9 },
    releasedToSponsorAt: null,
    version: 1,
    createdAt: '2026-06-01T10:00:00.000Z',
  };
  const analysis = analyseCut({ cut, snapshot: cut.snapshot, patients, prior: cut.prior, priorSource: 'saved' });
  return {
    cut,
    analysis: { ...analysis, integrity: { contentHash: cut.contentHash, recomputedHash: cut.contentHash, intact: true } },
    recommendations: [
      {
        id: 'r-1',
        dataCutId: cut.id,
        memberUserId: 'u-1',
        memberName: 'Invented Member',
        memberEmail: 'member@invented.test',
        decision: 'continue',
        analysisVersion: 1,
        rationale: 'Four responders among thirteen: the futility rule is not met.',
        signature: {
          id: 'sig-1',
          signerUserId: 'u-1',
          signerEmail: 'member@invented.test',
          signerName: 'Invented Member',
          meaning: 'I recommend "Continue to stage 2" for INV-301 cohort MAIN on data cut 1.',
          subjectType: 'recommendation',
          subjectId: cut.id,
          contentHash: 'b'.repeat(64),
          authenticatedAt: '2026-06-02T09:00:00.000Z',
          signedAt: '2026-06-02T09:01:00.000Z',
        },
        createdAt: '2026-06-02T09:01:00.000Z',
      },
    ],
    decisions: [
      {
        id: 'dec-1',
        dataCutId: cut.id,
        cohortId: 'c-1',
        cohortCode: 'MAIN',
        action: 'resume_stage_2',
        fromStatus: 'interim_review',
        toStatus: 'enrolling_stage_2',
        stopCategory: null,
        reason: 'The committee recommends continuing.',
        appliedBy: 'u-2',
        appliedByName: 'Invented Statistician',
        appliedAt: '2026-06-03T09:00:00.000Z',
      },
    ],
    committeeSize: 3,
  };
}

/** Text as a reader compares it: PDF.js may split a line anywhere, so runs of white space count as one. */
const squeeze = (text: string) => text.replace(/\s+/g, ' ');

describe('the data cut report', () => {
  it('when a report is rendered, then it embeds Inter and prints α, β, ≤ and θ as themselves', async () => {
    const pdf = await renderCutReport(reportInput());
    // Kept for people to look at, beside the browser tests' screenshots.
    mkdirSync(path.resolve(import.meta.dirname, '../../test-artifacts'), { recursive: true });
    writeFileSync(path.resolve(import.meta.dirname, '../../test-artifacts/report-sample.pdf'), pdf);
    expect(embeddedFonts(pdf).map((name) => name.split('+')[1]).sort()).toEqual(['Inter-Regular', 'Inter-SemiBold']);
    expect(namedFonts(pdf).every((name) => name.includes('+Inter-'))).toBe(true);
    const text = squeeze((await pdfPages(pdf)).join(' '));
    for (const symbol of ['α 0.05', 'β 0.2', '≤ 3 responders', 'θT', 'Beta(p0, 1 − p0)']) expect(text).toContain(symbol);
    for (const spelled of ['alpha', 'beta(', '<=', 'thetaT']) expect(text).not.toContain(spelled);
  });

  it('when a report is rendered, then every page is numbered and carries the caution in its footer, and the first page states it in full', async () => {
    const pages = (await pdfPages(await renderCutReport(reportInput()))).map(squeeze);
    expect(pages.length).toBeGreaterThan(1);
    pages.forEach((page, i) => {
      expect(page).toContain(`Page ${i + 1} of ${pages.length}`);
      expect(page).toContain(REPORT_FOOTER_CAUTION);
    });
    expect(pages[0]).toContain(DECISION_SUPPORT_ONLY);
  });

  it('when a report is rendered, then no code reaches its text: statuses, verdicts, decisions and recommendations are worded', async () => {
    const text = (await pdfPages(await renderCutReport(reportInput()))).join('\n');
    expect(rawCodesIn(text)).toEqual([]);
    const squeezed = squeeze(text);
    for (const words of ['Interim review', 'Stage 1 passed', 'Continue to stage 2', 'Resume accrual for stage 2', 'from interim review to enrolling stage 2']) {
      expect(squeezed).toContain(words);
    }
  });

  it('when the same input is rendered twice, then the bytes are the same', async () => {
    const input = reportInput();
    expect((await renderCutReport(input)).equals(await renderCutReport(input))).toBe(true);
  });
});

describe('the boundary chart', () => {
  it('when the futility boundary has no value at the start of stage 2, then stage 1 and the final boundary are separate segments with no line between them', () => {
    // 3/13, 12/43: in stage 1 the boundary is r1 − (n1 − k) from k = 11; at the final, r − (n − k) from k = 31.
    const points = Array.from({ length: 43 }, (_, i) => {
      const k = i + 1;
      const value = k <= 13 ? 3 - (13 - k) : 12 - (43 - k);
      return { decided: k, value: value >= 0 ? value : null };
    });
    const segments = boundarySegments(points, 13);
    expect(segments.map((s) => [s[0].decided, s.at(-1)?.decided])).toEqual([
      [10, 13],
      [31, 43],
    ]);
  });

  it('when both stages have a futility value on either side of n1, then the boundary still breaks at the end of stage 1', () => {
    const points = [1, 2, 3, 4].map((decided) => ({ decided, value: decided - 1 }));
    expect(boundarySegments(points, 2).map((s) => s.map((p) => p.decided))).toEqual([
      [1, 2],
      [3, 4],
    ]);
  });
});
