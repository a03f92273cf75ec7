/** How a data cut's kind and its open data issues read. */
import type { CutKind, OpenIssueKind } from '../data-cuts/data-cuts.schema.js';
import { GLYPHS, type Worded } from './glyphs.js';

export const CUT_KIND_LABELS: Record<CutKind, string> = {
  interim: 'Interim analysis',
  final: 'Final analysis',
};

export const OPEN_ISSUE_WORDS: Record<OpenIssueKind, Worded> = {
  pending_outcome: { label: 'Outcome pending', glyph: GLYPHS.pending },
  unattested_outcome: { label: 'Not attested', glyph: GLYPHS.draft },
  outcome_flag: { label: 'Outcome flagged', glyph: GLYPHS.disagrees },
  not_evaluable: { label: 'Not evaluable', glyph: GLYPHS.notEvaluable },
};

/** The headings of a cut's methods (the analysis keys them by a code); an unknown key reads "Method". */
export const METHOD_NAMES: Record<string, string> = {
  responseRate: 'Response rate',
  exactTest: 'Exact test',
  rule: 'Stopping rules',
  inference: 'Inference after a two-stage design',
  bayes: 'Bayesian figures',
  sites: 'Sites',
  multiplicity: 'Multiplicity',
  deviation: 'Deviation from the planned size',
};
