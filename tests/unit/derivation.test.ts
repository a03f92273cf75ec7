/**
 * Worked derivations of the best overall response, written from the RECIST 1.1 rules:
 * Eisenhauer et al. (2009), "New response evaluation criteria in solid tumours: revised RECIST
 * guideline (version 1.1)", Eur J Cancer 45:228–247 — the best-overall-response table for when
 * confirmation of CR and PR is required, its footnote on a CR followed by PR, the minimum
 * duration for stable disease, and confirmation of response (table and section contents recalled
 * from memory). A 4-week (28-day) confirmation interval, a 6-week (42-day) SD minimum and an
 * 8-week (56-day) assessment schedule are common practice, not taken from the guideline.
 */
import { describe, expect, it } from 'vitest';
import {
  deriveBestOverallResponse,
  disagreesWithDerivation,
  type AssessmentInput,
  type DerivationSettings,
  type TimepointResponse,
} from '../../server/assessments/derivation.js';

const ENROLLED = '2026-01-05'; // SD counts from 2026-02-16 (day 42)
const SETTINGS: DerivationSettings = {
  confirmationRequired: true,
  confirmationMinDays: 28,
  sdMinDays: 42,
  neBetweenResponses: 'ignore',
  assessmentIntervalDays: 56,
};

const series = (...pairs: Array<[string, TimepointResponse]>): AssessmentInput[] => pairs.map(([date, response], i) => ({ id: `a${i + 1}`, date, response }));

const derive = (assessments: AssessmentInput[], settings: Partial<DerivationSettings> = {}, today = '2026-04-01') =>
  deriveBestOverallResponse({ enrolledOn: ENROLLED, assessments, settings: { ...SETTINGS, ...settings }, today });

type Case = {
  name: string;
  source: string;
  assessments: AssessmentInput[];
  settings?: Partial<DerivationSettings>;
  bor: TimepointResponse | null;
  responder: boolean | null;
  confirmed: boolean;
};

const TABLE = 'RECIST 1.1 (Eisenhauer et al. 2009), best overall response when confirmation is required';
const SD_MIN = 'RECIST 1.1 (Eisenhauer et al. 2009), minimum duration for stable disease';
const CONFIRM = 'RECIST 1.1 (Eisenhauer et al. 2009), confirmation of CR and PR; NE handling is the protocol setting';

const cases: Case[] = [
  { name: 'CR then CR 28 days later', source: `${TABLE}: CR, CR → CR`, assessments: series(['2026-02-16', 'CR'], ['2026-03-16', 'CR']), bor: 'CR', responder: true, confirmed: true },
  { name: 'PR then PR 28 days later', source: `${TABLE}: PR, PR → PR`, assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'PR']), bor: 'PR', responder: true, confirmed: true },
  { name: 'PR then CR 28 days later', source: `${TABLE}: PR, CR → PR`, assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'CR']), bor: 'PR', responder: true, confirmed: true },
  {
    name: 'PR then SD, both past the SD minimum',
    source: `${TABLE}: PR, SD → SD`,
    assessments: series(['2026-03-02', 'PR'], ['2026-04-27', 'SD']),
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'PR then SD, the PR before the SD minimum and the SD too',
    source: `${TABLE}: PR, SD → SD; ${SD_MIN} not met → NE`,
    assessments: series(['2026-01-26', 'PR'], ['2026-02-09', 'SD']),
    bor: 'NE',
    responder: null,
    confirmed: false,
  },
  {
    name: 'CR then PR 28 days later',
    source: `${TABLE}: CR, PR → PR (footnote: the first CR is read as PR)`,
    assessments: series(['2026-02-16', 'CR'], ['2026-03-16', 'PR']),
    bor: 'PR',
    responder: true,
    confirmed: true,
  },
  { name: 'SD only, before the minimum duration', source: `${SD_MIN}: not met → NE`, assessments: series(['2026-02-02', 'SD']), bor: 'NE', responder: null, confirmed: false },
  { name: 'SD once the minimum duration is met', source: `${SD_MIN}: met → SD`, assessments: series(['2026-02-16', 'SD']), bor: 'SD', responder: false, confirmed: false },
  {
    name: 'PD at the first assessment (later SD ignored)',
    source: 'RECIST 1.1 (Eisenhauer et al. 2009): best response is recorded up to progression; PD first → PD',
    assessments: series(['2026-03-02', 'PD'], ['2026-04-27', 'SD']),
    bor: 'PD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'SD before the minimum, then PD',
    source: `${SD_MIN}: not met and progression follows → PD`,
    assessments: series(['2026-02-02', 'SD'], ['2026-03-30', 'PD']),
    bor: 'PD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'PR past the SD minimum, then PD',
    source: `${TABLE}: PR, PD → SD provided the SD minimum is met`,
    assessments: series(['2026-02-16', 'PR'], ['2026-04-13', 'PD']),
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'PR before the SD minimum, then PD',
    source: `${TABLE}: PR, PD → PD when the SD minimum is not met`,
    assessments: series(['2026-01-26', 'PR'], ['2026-03-23', 'PD']),
    bor: 'PD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'CR past the SD minimum, then NE only',
    source: `${TABLE}: CR, NE → SD provided the SD minimum is met (NE breaks confirmation)`,
    assessments: series(['2026-02-16', 'CR'], ['2026-04-13', 'NE']),
    settings: { neBetweenResponses: 'breaks_confirmation' },
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  { name: 'NE at every assessment', source: `${TABLE}: NE, NE → NE`, assessments: series(['2026-03-02', 'NE'], ['2026-04-27', 'NE']), bor: 'NE', responder: null, confirmed: false },
  {
    name: 'PR–NE–PR, the second PR beyond the window, NE ignored',
    source: `${CONFIRM}: NE ignored → confirmed PR`,
    assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'NE'], ['2026-04-13', 'PR']),
    settings: { neBetweenResponses: 'ignore' },
    bor: 'PR',
    responder: true,
    confirmed: true,
  },
  {
    name: 'PR–NE–PR, the second PR beyond the window, NE breaks confirmation',
    source: `${CONFIRM}: NE breaks → the first PR is unconfirmed (SD); the second still awaits confirmation`,
    assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'NE'], ['2026-04-13', 'PR']),
    settings: { neBetweenResponses: 'breaks_confirmation' },
    bor: 'SD',
    responder: null,
    confirmed: false,
  },
  {
    name: 'PR–NE–PR–SD, the second PR beyond the window, NE breaks confirmation',
    source: `${CONFIRM}: NE breaks, SD follows the second PR → SD`,
    assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'NE'], ['2026-04-13', 'PR'], ['2026-06-08', 'SD']),
    settings: { neBetweenResponses: 'breaks_confirmation' },
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'PR–NE–PR, the second PR within the window (21 days), NE ignored',
    source: `${CONFIRM}: no assessment 28 days on yet → awaiting confirmation`,
    assessments: series(['2026-02-16', 'PR'], ['2026-02-23', 'NE'], ['2026-03-09', 'PR']),
    settings: { neBetweenResponses: 'ignore' },
    bor: 'SD',
    responder: null,
    confirmed: false,
  },
  {
    name: 'PR–NE–PR, the second PR within the window (21 days), NE breaks confirmation',
    source: `${CONFIRM}: NE breaks the first; the second awaits confirmation`,
    assessments: series(['2026-02-16', 'PR'], ['2026-02-23', 'NE'], ['2026-03-09', 'PR']),
    settings: { neBetweenResponses: 'breaks_confirmation' },
    bor: 'SD',
    responder: null,
    confirmed: false,
  },
  {
    name: 'PR–NE–PR–SD, the second PR within the window, NE ignored',
    source: `${CONFIRM}: never confirmed, SD follows → SD`,
    assessments: series(['2026-02-16', 'PR'], ['2026-02-23', 'NE'], ['2026-03-09', 'PR'], ['2026-05-04', 'SD']),
    settings: { neBetweenResponses: 'ignore' },
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'PR then PR 14 days later then SD',
    source: `${CONFIRM}: the confirming assessment must be at least 28 days later (common practice)`,
    assessments: series(['2026-02-16', 'PR'], ['2026-03-02', 'PR'], ['2026-04-27', 'SD']),
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'CR, CR 14 days later, CR 35 days later',
    source: `${CONFIRM}: confirmed by the first CR at least 28 days on`,
    assessments: series(['2026-02-16', 'CR'], ['2026-03-02', 'CR'], ['2026-03-23', 'CR']),
    bor: 'CR',
    responder: true,
    confirmed: true,
  },
  {
    name: 'PR then SD then PR: SD in between breaks the response',
    source: `${CONFIRM}: the response must persist between the two assessments`,
    assessments: series(['2026-02-16', 'PR'], ['2026-03-16', 'SD'], ['2026-04-13', 'PR'], ['2026-05-11', 'SD']),
    bor: 'SD',
    responder: false,
    confirmed: false,
  },
  {
    name: 'confirmation not required: a lone PR before the SD minimum',
    source: 'RECIST 1.1 (Eisenhauer et al. 2009): without confirmation the best overall response is the best timepoint response',
    assessments: series(['2026-02-02', 'PR'], ['2026-03-30', 'SD']),
    settings: { confirmationRequired: false },
    bor: 'PR',
    responder: true,
    confirmed: false,
  },
  {
    name: 'confirmation not required: SD only before the minimum',
    source: `${SD_MIN}: applies without confirmation too → NE`,
    assessments: series(['2026-02-02', 'SD']),
    settings: { confirmationRequired: false },
    bor: 'NE',
    responder: null,
    confirmed: false,
  },
  { name: 'no assessment yet', source: 'nothing to derive (common practice: outcome pending)', assessments: [], bor: null, responder: null, confirmed: false },
];

describe('worked derivations of the best overall response', () => {
  it.each(cases)('when $name, then the best overall response is $bor ($source)', (c) => {
    const result = derive(c.assessments, c.settings);
    expect({ bor: result.bestOverallResponse, responder: result.responder, confirmed: result.confirmed }).toEqual({
      bor: c.bor,
      responder: c.responder,
      confirmed: c.confirmed,
    });
    expect(result.steps).toHaveLength(c.assessments.length);
    expect(result.explanation.length).toBeGreaterThan(1);
  });
});

describe('the derivation explains itself', () => {
  it('when a lone PR waits for confirmation, then the needed sentence names the earliest confirming date (28 days, common practice)', () => {
    const result = derive(series(['2026-03-03', 'PR']));
    expect(result.needed).toEqual(['PR on 3 March 2026 needs a confirming assessment on or after 31 March 2026.']);
    expect(result.responder).toBeNull();
    expect(result.bestOverallResponse).toBe('SD');
    expect(result.steps[0]).toMatchObject({ assessmentId: 'a1', role: 'awaiting-confirmation' });
    expect(result.pendingConfirmation).toEqual([
      expect.objectContaining({ date: '2026-03-03', earliestConfirmation: '2026-03-31', dueBy: '2026-04-28', upgrade: false }),
    ]);
  });

  it('when a confirmed response is found, then the steps name the assessment that made it and the one that confirmed it', () => {
    const result = derive(series(['2026-03-16', 'PR'], ['2026-02-16', 'SD'], ['2026-04-13', 'PR']));
    expect(result.steps.map((s) => [s.date, s.role])).toEqual([
      ['2026-02-16', 'stable'],
      ['2026-03-16', 'made-response'],
      ['2026-04-13', 'confirmed'],
    ]);
    expect(result.explanation).toContain('Best overall response: PR, confirmed. The PR on 16 March 2026 was confirmed by the PR on 13 April 2026, 28 days later.');
    expect(result.basisDate).toBe('2026-03-16');
  });

  it('when assessments arrive out of order, then they are read in date order (CR then CR: confirmed CR)', () => {
    const result = derive(series(['2026-03-16', 'CR'], ['2026-02-16', 'CR']));
    expect(result.bestOverallResponse).toBe('CR');
    expect(result.steps.map((s) => s.assessmentId)).toEqual(['a2', 'a1']);
  });

  it('when an unconfirmed PR counts as SD, then the explanation says why in plain words', () => {
    const result = derive(series(['2026-03-02', 'PR'], ['2026-04-27', 'SD']));
    expect(result.explanation.join(' ')).toContain('The PR on 2 March 2026 was not confirmed (the response did not hold: the assessment on 27 April 2026 was SD)');
    expect(result.explanation.join(' ')).toContain('an unconfirmed response counts as stable disease');
    expect(result.steps[0].role).toBe('unconfirmed');
  });

  it('when a CR is followed by PR, then the CR is read as PR and the explanation says so', () => {
    const result = derive(series(['2026-02-16', 'CR'], ['2026-03-16', 'PR']));
    expect(result.explanation.join(' ')).toContain('so it is read as PR (RECIST 1.1)');
  });

  it('when a confirmed PR is followed by a CR, then the CR awaits its own confirmation as a possible upgrade', () => {
    const result = derive(series(['2026-02-16', 'PR'], ['2026-03-16', 'PR'], ['2026-03-30', 'CR']));
    expect(result.bestOverallResponse).toBe('PR');
    expect(result.responder).toBe(true);
    expect(result.needed).toEqual([
      'CR on 30 March 2026 needs a confirming assessment on or after 27 April 2026 (a CR then would raise the best overall response to a confirmed CR).',
    ]);
  });

  it('when SD is seen only before the minimum, then the SD step, the needed assessment and the attention item say so', () => {
    const result = derive(series(['2026-02-02', 'SD']));
    expect(result.steps[0].role).toBe('too-early-for-sd');
    expect(result.needed).toEqual(['An assessment of SD or better on or after 16 February 2026 (42 days after enrolment) to establish stable disease.']);
    expect(result.attention.map((a) => a.kind)).toEqual(['sd-before-minimum']);
    expect(result.explanation).toContain('Responder status is pending: without progression, a later assessment may still establish stable disease or a response.');
  });

  it('when there is no assessment, then the first is needed by the schedule', () => {
    expect(derive([]).needed).toEqual(["A first assessment on or after enrolment, due by 2 March 2026 on the protocol's schedule."]);
  });
});

describe('what needs attention', () => {
  it('when assessments are dated before enrolment, then they are left out of the derivation and flagged', () => {
    const result = derive(series(['2025-12-20', 'CR'], ['2026-02-16', 'PR'], ['2026-03-16', 'PR']));
    expect(result.bestOverallResponse).toBe('PR');
    expect(result.steps[0]).toMatchObject({ assessmentId: 'a1', role: 'before-enrolment' });
    expect(result.attention).toEqual([expect.objectContaining({ kind: 'assessment-before-enrolment', assessmentId: 'a1', date: '2025-12-20' })]);
    expect(result.explanation.join(' ')).toContain('1 assessment dated before enrolment was left out (20 December 2025)');
  });

  it('when the only assessment is before enrolment, then there is no best overall response', () => {
    const result = derive(series(['2025-12-20', 'PR']));
    expect(result.bestOverallResponse).toBeNull();
    expect(result.responder).toBeNull();
  });

  it('when an unconfirmed PR has waited past the next scheduled assessment, then it is flagged; before that date it is not', () => {
    const lonePr = series(['2026-03-03', 'PR']);
    const windowItems = (today: string) => derive(lonePr, {}, today).attention.filter((a) => a.kind === 'unconfirmed-past-window');
    expect(windowItems('2026-04-28')).toEqual([]);
    expect(windowItems('2026-04-29')).toEqual([
      expect.objectContaining({ kind: 'unconfirmed-past-window', message: 'The PR on 3 March 2026 is still unconfirmed: the next assessment was due by 28 April 2026.' }),
    ]);
  });

  it('when two assessments are further apart than the schedule, then the gap is flagged (enrolment counts as the start)', () => {
    const result = derive(series(['2026-03-16', 'SD'], ['2026-05-11', 'SD'], ['2026-07-20', 'SD']));
    const gaps = result.attention.filter((a) => a.kind === 'gap-longer-than-schedule');
    expect(gaps.map((g) => g.date)).toEqual(['2026-03-16', '2026-07-20']);
    expect(gaps[0].message).toBe('70 days passed between enrolment on 5 January 2026 and the assessment on 16 March 2026; the protocol schedules assessments every 56 days.');
  });

  it('when the entered outcome differs from the derived one, then it is flagged; a pending side is never a disagreement', () => {
    const result = deriveBestOverallResponse({
      enrolledOn: ENROLLED,
      assessments: series(['2026-03-02', 'PR'], ['2026-04-27', 'SD']),
      settings: SETTINGS,
      today: '2026-05-01',
      entered: { outcome: 'responder', bestOverallResponse: 'PR' },
    });
    expect(result.attention.find((a) => a.kind === 'entered-disagrees')?.message).toBe(
      'The entered outcome (responder, PR) disagrees with the one derived from the assessments (non-responder, SD).',
    );
    expect(disagreesWithDerivation({ outcome: 'non_responder', bestOverallResponse: 'PD' }, { bestOverallResponse: 'SD', responder: false })).toBe(true);
    expect(disagreesWithDerivation({ outcome: 'non_responder', bestOverallResponse: 'SD' }, { bestOverallResponse: 'SD', responder: false })).toBe(false);
    expect(disagreesWithDerivation({ outcome: 'pending', bestOverallResponse: null }, { bestOverallResponse: 'PR', responder: true })).toBe(false);
    expect(disagreesWithDerivation({ outcome: 'responder', bestOverallResponse: 'PR' }, { bestOverallResponse: 'SD', responder: null })).toBe(false);
  });
});
