/**
 * Demo data cuts (invented): TSY-201's interim cut with a signed "continue" and accrual resumed,
 * TSY-203's interim cut with a signed "stop for futility" applied, and TSY-202's interim cut frozen
 * with the committee's review still pending. Idempotent: a trial that already has a cut is left
 * alone, and a trial without a locked design or patients is skipped.
 */
import type { Knex } from 'knex';
import { writeAudit } from '../../audit/audit.js';
import { currentDesign } from '../../designs/index.js';
import { canTransition, type CohortStatus } from '../../trials/index.js';
import { applyWithin, DECISION_TARGET, freezeWithin, insertDecision, releaseCohort, signWithin, type RecommendationDecision, type StatusDecision } from '../../data-cuts/index.js';
import type { SessionUser } from '../../auth/access.js';
import { demoSigningSession } from './signing.js';

type Plan = {
  code: string;
  recommendation?: { decision: RecommendationDecision; rationale: string };
  decision?: { action: StatusDecision; reason: string; stopCategory?: 'futility' };
};

const PLANS: Plan[] = [
  {
    code: 'TSY-201',
    recommendation: {
      decision: 'continue',
      rationale: 'Stage 1 passed the futility rule with room to spare; no safety signal in the listings reviewed. Continue to stage 2.',
    },
    decision: { action: 'resume_stage_2', reason: 'The committee recommends continuing; stage 1 passed.' },
  },
  {
    code: 'TSY-203',
    recommendation: {
      decision: 'stop_futility',
      rationale: 'Stage 1 ended at or below r1: the futility rule is met and the posterior probability of a worthwhile rate is low.',
    },
    decision: { action: 'stop', stopCategory: 'futility', reason: 'Futility rule met at the end of stage 1 (committee recommendation).' },
  },
  { code: 'TSY-202' },
];

const addDays = (iso: string, days: number) => {
  const d = new Date(`${iso}T12:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d;
};

async function actor(trx: Knex.Transaction, email: string): Promise<Pick<SessionUser, 'id' | 'email'> | undefined> {
  const row = await trx('users').whereRaw('lower(email) = ?', [email]).first('id', 'email');
  return row ? { id: row.id, email: row.email } : undefined;
}

export async function seedDataCuts(trx: Knex.Transaction, trials: Map<string, string>, today: Date): Promise<void> {
  const statistician = await actor(trx, 'sam.stat@tessaly.test');
  const monitor = await actor(trx, 'mona.monitor@tessaly.test');
  if (!statistician || !monitor) return;
  for (const plan of PLANS) {
    const trialId = trials.get(plan.code);
    if (!trialId || (await trx('data_cuts').where({ trial_id: trialId }).first('id'))) continue;
    const cohort: { id: string; status: CohortStatus } | undefined = await trx('cohorts').where({ trial_id: trialId }).orderBy('position').first('id', 'status');
    if (!cohort || !(await currentDesign(trx, cohort.id))) continue;
    const stage1: Array<{ enrolled_on: string; response_assessed_on: string | null }> = await trx('patients')
      .where({ cohort_id: cohort.id, stage: 1 })
      .select('enrolled_on', 'response_assessed_on');
    if (stage1.length === 0) continue;

    // Past reviews saw the stage-1 patients (accrual paused after the last of them) and were cut a few
    // days after the last stage-1 outcome; the pending review is cut today.
    const lastEnrolment = stage1.map((p) => p.enrolled_on).sort().at(-1) as string;
    const lastOutcome = stage1.map((p) => p.response_assessed_on ?? p.enrolled_on).sort().at(-1) as string;
    const pending = !plan.recommendation;
    const cutAt = pending ? today : new Date(Math.min(addDays(lastOutcome, 3).getTime(), today.getTime()));
    const cut = await freezeWithin(trx, { trialId, cohortId: cohort.id, kind: 'interim' }, statistician, {
      cutAt,
      enrolledOnOrBefore: pending ? today.toISOString().slice(0, 10) : lastEnrolment,
      cohortStatusAtCut: pending ? cohort.status : 'interim_review',
    });
    if (!plan.recommendation || !plan.decision) continue;

    const session = await demoSigningSession(trx, monitor.id, { action: 'recommendation', subjectId: cut.id }, new Date(cutAt.getTime() + 2 * 86_400_000));
    await signWithin(trx, cut, { ...plan.recommendation, analysisVersion: cut.version }, monitor, session, { notify: false });
    const target = DECISION_TARGET[plan.decision.action];
    const input = { action: plan.decision.action, reason: plan.decision.reason, stopCategory: plan.decision.stopCategory ?? null, cohortId: cohort.id };
    if (cohort.status === target) {
      // The demo trial already stands where the decision leads: record the decision that took it there.
      const appliedAt = new Date(cutAt.getTime() + 4 * 86_400_000);
      const decisionId = await insertDecision(trx, {
        dataCutId: cut.id,
        cohortId: cohort.id,
        action: plan.decision.action,
        fromStatus: 'interim_review',
        toStatus: target,
        stopCategory: input.stopCategory,
        reason: input.reason,
        appliedBy: statistician.id,
        appliedAt,
      });
      await releaseCohort(trx, cut, cohort.id, decisionId, statistician);
      await writeAudit(trx, {
        actorUserId: statistician.id,
        trialId,
        entityType: 'data_cut',
        entityId: cut.id,
        action: 'decision_applied',
        after: { decisionId, cohortId: cohort.id, action: plan.decision.action, cohortStatus: target },
        reason: input.reason,
      });
    } else if (canTransition(cohort.status, target) || (plan.decision.action === 'resume_stage_2' && cohort.status === 'enrolling_stage_1')) {
      await applyWithin(trx, cut.id, input, statistician, { notify: false });
    }
  }
}
