import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { seedPeopleAndTrials } from '../../server/dev/seed/people-and-trials.js';
import { seedDesigns } from '../../server/dev/seed/designs.js';
import { writeCounts } from '../support/design-factories.js';

let stack: Stack;

beforeAll(async () => {
  stack = await startStack();
}, 120_000);
afterAll(async () => stack?.close());

async function seedTwice() {
  const today = new Date('2026-11-20T09:00:00Z');
  await stack.db.transaction(async (trx) => seedDesigns(trx, await seedPeopleAndTrials(trx, today), today));
  const first = await writeCounts(stack.db);
  await stack.db.transaction(async (trx) => seedDesigns(trx, await seedPeopleAndTrials(trx, today), today));
  return { first, second: await writeCounts(stack.db) };
}

describe('demo designs', () => {
  it('when the demo seed runs twice, then every demo cohort has its signed design and status once', async () => {
    const { first, second } = await seedTwice();
    expect(second).toEqual(first);
    const rows = await stack.db('cohorts as c')
      .join('trials as t', 't.id', 'c.trial_id')
      .leftJoin('design_versions as d', 'd.cohort_id', 'c.id')
      .leftJoin('signatures as s', 's.id', 'd.signature_id')
      .orderBy(['t.code', 'c.position'])
      .select('t.code as trial', 'c.code as cohort', 'c.status', 'c.stop_category', 'd.version', 'd.selection', 'd.r1', 'd.n1', 'd.r', 'd.n', 's.signer_email', 's.authenticated_at');
    const summary = rows.map((r) => `${r.trial} ${r.cohort} ${r.status} ${r.selection ?? '-'} ${r.r1 ?? '-'}/${r.n1 ?? '-'} ${r.r ?? '-'}/${r.n ?? '-'}`);
    expect(summary).toEqual([
      // Simon (1989) Table 1 for TSY-201 and TSY-202's settings (values recalled from memory).
      'TSY-201 MAIN enrolling_stage_2 optimal 3/13 12/43',
      'TSY-202 MAIN interim_review minimax 1/15 5/25',
      'TSY-203 MAIN stopped optimal 0/10 3/29',
      'TSY-204 NSCLC enrolling_stage_1 optimal 2/18 7/43',
      'TSY-204 CRC enrolling_stage_1 minimax 0/13 3/27',
      'TSY-204 THY enrolling_stage_1 optimal 1/9 8/34',
      'TSY-205 MAIN draft - -/- -/-',
    ]);
    expect(rows.filter((r) => r.version).every((r) => r.signer_email === 'sam.stat@tessaly.test' && r.authenticated_at)).toBe(true);
    expect(rows.find((r) => r.trial === 'TSY-203')?.stop_category).toBe('futility');
  });
});
