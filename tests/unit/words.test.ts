/**
 * The words module: every code of every enum has its words, no word is itself a code, each meaning
 * has one glyph and each glyph one meaning, every character the module prints is drawn by the
 * shipped Inter, and the signature's wording shown before signing is the one recorded.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import * as fontkit from 'fontkit';
import { ROLES } from '../../server/auth/access.js';
import { COHORT_STATUSES, NE_BETWEEN_RESPONSES, OUTCOME_SOURCES, STOP_CATEGORIES } from '../../server/trials/trials.schema.js';
import { CUT_KINDS, DECISION_ACTIONS, OPEN_ISSUE_KINDS, RECOMMENDATION_DECISIONS, decisionChoices, recommendationChoices } from '../../server/data-cuts/data-cuts.schema.js';
import { OUTCOMES, RESPONSES } from '../../server/patients/patients.schema.js';
import { ANALYSIS_POPULATIONS, INTERIM_ACCRUAL, SELECTIONS } from '../../server/designs/designs.schema.js';
import * as words from '../../server/words/index.js';
import { INTER_FILES } from '../../server/data-cuts/report/fonts.js';
import { rawCodesIn } from '../support/raw-codes.js';

const {
  GLYPHS,
  GLYPH_MEANINGS,
  STATUS_WORDS,
  STATUS_IN_A_SENTENCE,
  STOP_CATEGORY_LABELS,
  STOPPED_FOR,
  RECOMMENDATION_WORDS,
  DECISION_WORDS,
  VERDICT_WORDS,
  OUTCOME_WORDS,
  ROLE_LABELS,
  ROLE_WORDS,
  OPEN_ISSUE_WORDS,
  CUT_KIND_LABELS,
  SELECTION_LABELS,
  POPULATION_LABELS,
  POPULATION_COUNTS,
  POPULATION_IN_A_SENTENCE,
  INTERIM_ACCRUAL_LABELS,
  OUTCOME_SOURCE_LABELS,
  NE_BETWEEN_RESPONSES_LABELS,
  RESPONSE_LABELS,
} = words;

/** Each enum of codes beside the words that name its codes. */
const ENUMS: Array<[string, readonly string[], Record<string, unknown>]> = [
  ['cohort statuses (labels)', [...COHORT_STATUSES, 'mixed'], STATUS_WORDS],
  ['cohort statuses (in a sentence)', COHORT_STATUSES, STATUS_IN_A_SENTENCE],
  ['stop categories (labels)', STOP_CATEGORIES, STOP_CATEGORY_LABELS],
  ['stop categories (after "stopped")', STOP_CATEGORIES, STOPPED_FOR],
  ['recommendations', RECOMMENDATION_DECISIONS, RECOMMENDATION_WORDS],
  ['decisions', DECISION_ACTIONS, DECISION_WORDS],
  ['verdicts', ['continue', 'stop-futility', 'promising', 'not-promising', 'undetermined'], VERDICT_WORDS],
  ['outcomes', OUTCOMES, OUTCOME_WORDS],
  ['roles (labels)', ROLES, ROLE_LABELS],
  ['roles (in a sentence)', ROLES, ROLE_WORDS],
  ['open data issues', OPEN_ISSUE_KINDS, OPEN_ISSUE_WORDS],
  ['cut kinds', CUT_KINDS, CUT_KIND_LABELS],
  ['design selections', SELECTIONS, SELECTION_LABELS],
  ['analysis populations (labels)', ANALYSIS_POPULATIONS, POPULATION_LABELS],
  ['analysis populations (phrases)', ANALYSIS_POPULATIONS, POPULATION_COUNTS],
  ['analysis populations (in a sentence)', ANALYSIS_POPULATIONS, POPULATION_IN_A_SENTENCE],
  ['interim accrual', INTERIM_ACCRUAL, INTERIM_ACCRUAL_LABELS],
  ['outcome sources', OUTCOME_SOURCES, OUTCOME_SOURCE_LABELS],
  ['NE between responses', NE_BETWEEN_RESPONSES, NE_BETWEEN_RESPONSES_LABELS],
  ['timepoint responses', RESPONSES, RESPONSE_LABELS],
];

const textOf = (word: unknown): string => (typeof word === 'string' ? word : (word as words.Worded).label);

/** Every string the module exports, however deep. */
function strings(value: unknown): string[] {
  if (typeof value === 'string') return [value];
  if (Array.isArray(value)) return value.flatMap(strings);
  if (value && typeof value === 'object') return Object.values(value).flatMap(strings);
  return [];
}

describe('every code has its words', () => {
  it.each(ENUMS)('when the %s are listed, then each code has words and no word is a code', (_name, codes, wordsOf) => {
    expect(Object.keys(wordsOf).sort()).toEqual([...codes].sort());
    for (const code of codes) {
      const text = textOf(wordsOf[code]);
      expect(text.trim().length).toBeGreaterThan(0);
      // A code that is an English word ("completed", "sponsor") may read as itself; a code-like one never.
      expect(rawCodesIn(text)).toEqual([]);
    }
  });

  it('when any word of the module is scanned, then no raw code is in it', () => {
    const all = strings(Object.values(words).filter((v) => typeof v !== 'function'));
    expect(all.length).toBeGreaterThan(100);
    expect(all.flatMap(rawCodesIn)).toEqual([]);
  });

  it('when a committee member is named, then it is never the code "monitor"', () => {
    expect(ROLE_LABELS.monitor).toBe('Committee member');
    expect(ROLE_WORDS.monitor).toMatch(/^committee member/);
  });
});

describe('one glyph per meaning', () => {
  it('when the glyphs are listed, then no two meanings share one and each meaning is explained', () => {
    const glyphs = Object.values(GLYPHS);
    expect(new Set(glyphs).size).toBe(glyphs.length);
    expect(Object.keys(GLYPH_MEANINGS).sort()).toEqual(Object.keys(GLYPHS).sort());
  });

  it('when a status, verdict, outcome, recommendation, decision or data issue is worded, then its glyph is one of the module’s glyphs', () => {
    const known = new Set<string>(Object.values(GLYPHS));
    for (const map of [STATUS_WORDS, VERDICT_WORDS, OUTCOME_WORDS, RECOMMENDATION_WORDS, DECISION_WORDS, OPEN_ISSUE_WORDS]) {
      for (const word of Object.values(map)) expect(known.has(word.glyph)).toBe(true);
    }
  });

  it('when the statuses of a cohort differ, then their glyphs differ too', () => {
    const glyphs = Object.values(STATUS_WORDS).map((w) => w.glyph);
    expect(new Set(glyphs).size).toBe(glyphs.length);
  });

  it('when ▲ and ▼ appear, then ▲ means promising and ▼ futility, nothing else', () => {
    const uses = (glyph: string) =>
      [STATUS_WORDS, VERDICT_WORDS, OUTCOME_WORDS, RECOMMENDATION_WORDS, DECISION_WORDS, OPEN_ISSUE_WORDS]
        .flatMap((map) => Object.values(map))
        .filter((w) => w.glyph === glyph)
        .map((w) => w.label);
    expect(uses('▲')).toEqual(['Promising']);
    expect(uses('▼')).toEqual(['Futility rule met', 'Stop for futility']);
  });
});

describe('the shipped Inter draws every character of the module', () => {
  const files = Object.entries(INTER_FILES);
  it.each(files)('when the %s file is read, then it has a glyph for every character the words module prints', (_weight, file) => {
    const font = fontkit.create(readFileSync(file)) as fontkit.Font;
    const characters = new Set(strings(Object.values(words).filter((v) => typeof v !== 'function')).flatMap((s) => Array.from(s)));
    const missing = [...characters].filter((c) => c !== '\n' && !font.hasGlyphForCodePoint(c.codePointAt(0) as number));
    expect(missing).toEqual([]);
  });

  it('when a glyph Inter lacks is checked, then the check finds it missing (the test can fail)', () => {
    const font = fontkit.create(readFileSync(INTER_FILES.regular)) as fontkit.Font;
    for (const lacking of ['⏸', '✍', '⧗', '⚑', '▸']) expect(font.hasGlyphForCodePoint(lacking.codePointAt(0) as number)).toBe(false);
  });
});

describe('the wording of a recommendation’s signature', () => {
  const cut = { trialCode: 'INV-1', cohortCodes: ['MAIN'], cutSeq: 2, cutId: 'cut-id', analysisVersion: 3 };

  it('when no choice is made yet, then the wording says so, and once chosen it names the choice as the server records it', () => {
    expect(words.recommendationMeaning({ ...cut, decision: null })).toBe(`I recommend ${words.CHOICE_NOT_MADE} for INV-1 cohort MAIN on data cut 2 (cut-id), having reviewed its analysis version 3.`);
    expect(words.recommendationMeaning({ ...cut, decision: 'stop_futility' })).toBe('I recommend "Stop for futility" for INV-1 cohort MAIN on data cut 2 (cut-id), having reviewed its analysis version 3.');
  });

  it('when a cut covers several cohorts, then all are named', () => {
    expect(words.recommendationMeaning({ ...cut, cohortCodes: ['A', 'B'], decision: 'continue' })).toContain('for INV-1 cohorts A, B on data cut 2');
  });
});

describe('"Continue to stage 2" only where a stage 2 is ahead', () => {
  const twoStage = { n1: 13 };
  it.each([
    ['a two-stage cohort in stage 1', 'enrolling_stage_1', twoStage, true],
    ['a two-stage cohort in interim review', 'interim_review', twoStage, true],
    ['a two-stage cohort already in stage 2', 'enrolling_stage_2', twoStage, false],
    ['a two-stage cohort at its final analysis', 'final_analysis', twoStage, false],
    ['a single-stage cohort', 'enrolling_stage_1', { n1: null }, false],
    ['a cohort without a design', 'draft', null, false],
  ] as const)('when the cut holds %s (%s), then continuing is offered only where a stage 2 is ahead', (_name, status, design, offered) => {
    expect(recommendationChoices([{ status, design }]).includes('continue')).toBe(offered);
    expect(decisionChoices({ status, design }).includes('resume_stage_2')).toBe(offered);
    expect(recommendationChoices([{ status, design }])).toContain('stop_futility');
  });
});

describe('stored values in a change history', () => {
  it('when a stored code is shown under its field, then it reads in words; another value stays as it is', () => {
    expect(words.storedValueWords('status', 'final_analysis')).toBe('Final analysis');
    expect(words.storedValueWords('toStatus', 'interim_review')).toBe('Interim review');
    expect(words.storedValueWords('role', 'monitor')).toBe('Committee member');
    expect(words.storedValueWords('interimAccrual', 'continue_at_risk')).toBe('Continues at risk');
    expect(words.storedValueWords('reason', 'final_analysis looked fine')).toBe('final_analysis looked fine');
    expect(words.storedValuesWords('recommendations', ['continue', 'stop_other'])).toBe('Continue to stage 2, Stop for another reason');
  });
});
