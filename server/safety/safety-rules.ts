/**
 * The safety rule as the server enforces it. Inside the transaction of every write that can add a
 * toxicity — an adverse event recorded, corrected or imported, a design version signed with a new
 * rule — the cohort's patients are counted against its locked toxicity definition (in SQL) and
 * held against its rule: the continuous toxicity boundary, or the Bryant–Day stage-1 toxicity
 * limit. A crossing pauses the cohort's accrual in that same transaction, and the trial's
 * statisticians and committee members get one e-mail each. Only a committee recommendation and the
 * statistician's decision on a data cut end the pause (data-cuts); after a resume, the cohort
 * pauses again only when a toxicity beyond the ones the committee reviewed arrives.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import type { Listener, DesignSigned } from '../hooks.js';
import { enqueueMail } from '../mail/outbox.js';
import { recipientRoles } from '../auth/visibility.js';
import { currentDesign, type LockedDesign, type ToxicityDefinition } from '../designs/index.js';
import { lockCohort, pauseForSafety, safetyReviewOf, trialCode } from '../trials/index.js';
import { memberEmails } from '../people/index.js';
import { crossingSentence, DECISION_SUPPORT_ONLY, describeSafetyState, INTERIM_DATA, safetyPauseReason, toxicityDefinitionSentence } from '../words/index.js';
import { safetyCounts } from './safety.repository.js';
import { safetyRuleState, type SafetyRuleOfDesign } from './toxicity.js';
import type { SafetyRuleState } from './safety.schema.js';

/** Today as the window of a toxicity definition reads it. */
export const todayIso = () => new Date().toISOString().slice(0, 10);

/** The rule of a design version, or null when it monitors response only. */
export function ruleOfDesign(design: (Partial<Pick<LockedDesign, 'boundary' | 'bryantDay'>> & Pick<LockedDesign, 'n1' | 'n'>) | null | undefined): SafetyRuleOfDesign | null {
  if (design?.boundary) return { rule: 'toxicity_boundary', bounds: design.boundary.bounds };
  if (design?.bryantDay && design.n1 !== null) return { rule: 'bryant_day', n1: design.n1, t1: design.bryantDay.t1, n: design.n, t: design.bryantDay.t };
  return null;
}

/** The toxicities the rule counts: every assessable patient's for the boundary, the stage-1 patients' for Bryant–Day. */
export const ruleToxicities = (state: SafetyRuleState) => (state.rule === 'bryant_day' ? state.stage1Toxicities : state.toxicities);

export type SafetyOutcome = { paused: boolean; state: SafetyRuleState | null };

type Counted = { design: LockedDesign & { toxicity: ToxicityDefinition }; state: SafetyRuleState };

async function countAgainstRule(db: Db | Knex.Transaction, cohortId: string, today = todayIso()): Promise<Counted | null> {
  const design = await currentDesign(db, cohortId);
  const rule = ruleOfDesign(design);
  if (!design?.toxicity || !rule) return null;
  const counts = (await safetyCounts(db, [{ cohortId, ...design.toxicity }], today)).get(cohortId);
  return counts ? { design: { ...design, toxicity: design.toxicity }, state: safetyRuleState(rule, counts) } : null;
}

/** Where the cohort stands against its safety rule now (null when its design monitors response only). */
export async function currentSafetyState(db: Db | Knex.Transaction, cohortId: string): Promise<SafetyRuleState | null> {
  return (await countAgainstRule(db, cohortId))?.state ?? null;
}

/** Counts the cohort against its rule and pauses its accrual when the rule is crossed, in the caller's transaction. */
export async function applySafetyRules(trx: Knex.Transaction, input: { trialId: string; cohortId: string; actorUserId: string | null; today?: string }): Promise<SafetyOutcome> {
  const counted = await countAgainstRule(trx, input.cohortId, input.today);
  if (!counted) return { paused: false, state: null };
  const { design, state } = counted;
  if (!state.crossed) return { paused: false, state };
  const cohort = await lockCohort(trx, input.cohortId);
  if (!cohort) return { paused: false, state };
  const toxicities = ruleToxicities(state);
  const { reviewedToxicities } = await safetyReviewOf(trx, input.cohortId);
  if (reviewedToxicities !== null && toxicities <= reviewedToxicities) return { paused: false, state };
  const paused = await pauseForSafety(trx, { cohortId: input.cohortId, reason: safetyPauseReason(state.rule), toxicities, actorUserId: input.actorUserId });
  if (!paused) return { paused, state };
  // The figures of the crossing: hidden from the trial manager's audit view like other patient-level figures.
  await writeAudit(trx, {
    actorUserId: input.actorUserId,
    trialId: input.trialId,
    entityType: 'safety_rule',
    entityId: input.cohortId,
    action: 'crossed',
    after: { designVersion: design.version, state },
    reason: crossingSentence(state),
  });
  await queuePauseMail(trx, { trialId: input.trialId, cohortId: input.cohortId, cohortCode: cohort.code, design, state, toxicities });
  return { paused, state };
}

async function queuePauseMail(
  trx: Knex.Transaction,
  input: { trialId: string; cohortId: string; cohortCode: string; design: LockedDesign & { toxicity: ToxicityDefinition }; state: SafetyRuleState; toxicities: number },
): Promise<void> {
  // The crossing's figures are live safety figures: only their readers get this mail.
  const recipients = await memberEmails(trx, input.trialId, recipientRoles('live-efficacy', ['statistician', 'monitor']));
  const label = `${(await trialCode(trx, input.trialId)) ?? ''} ${input.cohortCode}`;
  const text = [
    `Accrual to ${label} is paused: ${safetyPauseReason(input.state.rule).replace(/^The/, 'the').replace(/\.$/, '')} (design version ${input.design.version}).`,
    crossingSentence(input.state),
    ...describeSafetyState(input.state),
    toxicityDefinitionSentence(input.design.toxicity),
    'The server refuses further enrolment in this cohort until the statistician applies the committee’s decision to resume accrual, or stops the cohort for safety.',
    'Next: freeze a data cut of the cohort for the committee’s review; a committee member signs a recommendation on it, and the statistician applies the decision.',
    '',
    `${DECISION_SUPPORT_ONLY} ${INTERIM_DATA}`,
  ];
  await enqueueMail(
    trx,
    recipients.map((to) => ({
      kind: 'safety_pause',
      to,
      subject: `${label}: safety rule crossed — accrual paused`,
      text: text.join('\n'),
      dedupeKey: `safety-pause:${input.cohortId}:${input.toxicities}:${to}`,
    })),
  );
}

/** Listens to design signatures: a new rule (or a new definition) is held against the data already there. */
export const applySafetyAfterDesignSigned: Listener<DesignSigned> = async (trx, signed) => {
  await applySafetyRules(trx, { trialId: signed.trialId, cohortId: signed.cohortId, actorUserId: signed.actorUserId });
};
