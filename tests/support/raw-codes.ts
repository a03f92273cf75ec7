/**
 * Codes that must never reach a person: every stored code of the product's enums that does not read
 * as an English word (snake_case and hyphenated codes, "undetermined"), the role code "monitor" (a
 * committee member is never called that), and any other snake_case token. E-mail addresses and web
 * addresses are left out (a demo address may contain "monitor"), as is text a page marks as a file
 * format's literal (inside <code>), which the browser scan removes before calling this.
 */
import { ROLES } from '../../server/auth/access.js';
import { COHORT_STATUSES, STOP_CATEGORIES } from '../../server/trials/trials.schema.js';
import { DECISION_ACTIONS, OPEN_ISSUE_KINDS, RECOMMENDATION_DECISIONS } from '../../server/data-cuts/data-cuts.schema.js';
import { LIST_STATUSES, OUTCOMES } from '../../server/patients/patients.schema.js';
import { ANALYSIS_POPULATIONS, INTERIM_ACCRUAL, SELECTIONS } from '../../server/designs/designs.schema.js';
import { VERDICT_WORDS } from '../../server/words/index.js';

const codeLike = (code: string) => /[_-]/.test(code);

/** The enums' codes a sentence would never contain. */
export const RAW_CODES: readonly string[] = [
  ...new Set([
    ...[
      ...COHORT_STATUSES,
      ...STOP_CATEGORIES,
      ...DECISION_ACTIONS,
      ...RECOMMENDATION_DECISIONS,
      ...OPEN_ISSUE_KINDS,
      ...OUTCOMES,
      ...LIST_STATUSES,
      ...ANALYSIS_POPULATIONS,
      ...INTERIM_ACCRUAL,
      ...SELECTIONS,
      ...Object.keys(VERDICT_WORDS),
    ].filter(codeLike),
    'undetermined',
    ...ROLES.filter((role) => role === 'monitor'),
  ]),
];

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\-]/g, '\\$&');
// Codes are lower case: "Mona Monitor", an invented person's name, is not the role code.
const KNOWN = new RegExp(`(?<![\\w-])(${RAW_CODES.map(escape).join('|')})(?![\\w-])`, 'g');
const SNAKE = /(?<![\w.-])[a-z][a-z0-9]*(?:_[a-z0-9]+)+(?![\w-])/g;

/** The raw codes found in a text, each once, with a little of the text around the first. */
export function rawCodesIn(text: string): string[] {
  const plain = text.replace(/\S+@\S+\.\w+/g, ' ').replace(/https?:\/\/\S+/g, ' ');
  const found = new Map<string, string>();
  for (const pattern of [KNOWN, SNAKE]) {
    for (const match of plain.matchAll(pattern)) {
      const at = match.index ?? 0;
      if (!found.has(match[0])) found.set(match[0], `${match[0]} in “…${plain.slice(Math.max(0, at - 40), at + match[0].length + 40).replace(/\s+/g, ' ')}…”`);
    }
  }
  return [...found.values()];
}
