/**
 * The live safety state of every cohort of a trial: patients counted against the locked toxicity
 * definition (in SQL), the toxicity rate among assessable patients with its exact
 * (Clopper–Pearson) interval, and where the cohort stands against its safety rule — the
 * continuous toxicity boundary or the Bryant–Day stage-1 toxicity limit — with the distance to
 * it. Compute, then describe: the numbers come from the statistics engine and toxicity.ts, the
 * sentences from server/words.
 */
import type { Db } from '../db/knex.js';
import type { TrialAccess } from '../auth/access.js';
import { efficacyView, projectEfficacy, type Projected } from '../auth/visibility.js';
import { latestReleased, type ReleasedFigures } from '../evaluation/index.js';
import { NotFoundError } from '../http/errors.js';
import { currentDesigns, type LockedDesign, type ToxicityDefinition } from '../designs/index.js';
import { listCohorts, type CohortStatus, type SafetyPause } from '../trials/index.js';
import { CAUTIONS, describeSafetyState, responseOnlySafety, toxicityDefinitionSentence } from '../words/index.js';
import { safetyCounts } from './safety.repository.js';
import { ruleOfDesign, todayIso } from './safety-rules.js';
import { SAFETY_CONF_LEVEL, safetyRuleState, toxicityRate, type ToxicityRate } from './toxicity.js';
import type { SafetyCounts, SafetyRule, SafetyRuleState } from './safety.schema.js';

export type SafetyRuleSummary = {
  version: number;
  safetyRule: SafetyRule;
  definition: ToxicityDefinition;
  boundary: { theta: number; alpha: number; n: number; nominalLevel: number; crossingProbability: number; bounds: Array<number | null> } | null;
  bryantDay: { n1: number; t1: number; n: number; t: number; toxAcceptable: number; toxUnacceptable: number; alphaT: number } | null;
};

export type CohortSafety = {
  cohortId: string;
  cohortCode: string;
  cohortName: string;
  status: CohortStatus;
  safetyPause: SafetyPause | null;
  /** The locked design lets sponsors see response (the visibility rule reads it). */
  sponsorSeesResponse: boolean;
  /** The safety rule the design locked (not a figure: every member reads the design). */
  lockedRule: SafetyRuleSummary | null;
  /** The protocol's toxicity definition in a sentence. */
  definition: string | null;
  counts: SafetyCounts | null;
  rate: ToxicityRate | null;
  state: SafetyRuleState | null;
  /** Where the cohort stands against its rule, in sentences. */
  sentences: string[];
};

function summary(design: LockedDesign, definition: ToxicityDefinition): SafetyRuleSummary {
  return {
    version: design.version,
    safetyRule: design.safetyRule,
    definition,
    boundary: design.boundary && {
      theta: design.boundary.theta,
      alpha: design.boundary.alpha,
      n: design.boundary.bounds.length,
      nominalLevel: design.boundary.nominalLevel,
      crossingProbability: design.boundary.crossingProbability,
      bounds: design.boundary.bounds,
    },
    bryantDay:
      design.bryantDay && design.n1 !== null
        ? {
            n1: design.n1,
            t1: design.bryantDay.t1,
            n: design.n,
            t: design.bryantDay.t,
            toxAcceptable: design.bryantDay.toxAcceptable,
            toxUnacceptable: design.bryantDay.toxUnacceptable,
            alphaT: design.bryantDay.alphaT,
          }
        : null,
  };
}

export async function safetyOfTrial(db: Db, trialId: string, today = todayIso()): Promise<{ trialId: string; confLevel: number; cautions: string[]; cohorts: CohortSafety[] }> {
  const cohorts = await listCohorts(db, trialId);
  if (cohorts.length === 0 && !(await db('trials').where({ id: trialId }).first('id'))) throw new NotFoundError('The trial');
  const designs = await currentDesigns(db, cohorts.map((c) => c.id));
  const definitions = cohorts.flatMap((c) => {
    const toxicity = designs.get(c.id)?.toxicity;
    return toxicity ? [{ cohortId: c.id, ...toxicity }] : [];
  });
  const counted = await safetyCounts(db, definitions, today);
  return {
    trialId,
    confLevel: SAFETY_CONF_LEVEL,
    cautions: [...CAUTIONS],
    cohorts: cohorts.map((cohort): CohortSafety => {
      const design = designs.get(cohort.id);
      const rule = ruleOfDesign(design);
      const base = {
        cohortId: cohort.id,
        cohortCode: cohort.code,
        cohortName: cohort.name,
        status: cohort.status,
        safetyPause: cohort.safetyPause,
        sponsorSeesResponse: design?.sponsorSeesResponse ?? false,
      };
      const counts = counted.get(cohort.id);
      if (!design?.toxicity || !rule || !counts) {
        const sentences = [design ? responseOnlySafety(true) : 'No locked design yet.'];
        return { ...base, lockedRule: null, definition: null, counts: null, rate: null, state: null, sentences };
      }
      const state = safetyRuleState(rule, counts);
      return {
        ...base,
        lockedRule: summary(design, design.toxicity),
        definition: toxicityDefinitionSentence(design.toxicity),
        counts,
        rate: toxicityRate(counts),
        state,
        sentences: describeSafetyState(state),
      };
    }),
  };
}

/**
 * Keys of a cohort's safety state that carry live safety figures: the counts, the toxicity rate and
 * its interval, the rule's state and its sentences. The status, the pause, the locked rule and the
 * definition are every member's.
 */
export const LIVE_SAFETY_KEYS = ['counts', 'rate', 'state', 'sentences'] as const;

type ReleasedSafetyFigures = NonNullable<ReleasedFigures['safety']> & { cutId: string; cutSeq: number; cutAt: string };
export type VisibleCohortSafety = Projected<CohortSafety, (typeof LIVE_SAFETY_KEYS)[number], ReleasedSafetyFigures>;

/**
 * The live safety state as this viewer may see it (server/auth/visibility.ts: safety figures are
 * efficacy figures): everything computed, then projected cohort by cohort, with the safety part
 * of the latest released cut where the viewer may see it.
 */
export async function safetyFor(db: Db, access: TrialAccess): Promise<Omit<Awaited<ReturnType<typeof safetyOfTrial>>, 'cohorts'> & { cohorts: VisibleCohortSafety[] }> {
  const computed = await safetyOfTrial(db, access.trialId);
  const released = await latestReleased(db, computed.cohorts.map((c) => c.cohortId));
  return {
    ...computed,
    cohorts: computed.cohorts.map((cohort) => {
      const figures = released.get(cohort.cohortId);
      const releasedSafety = figures?.safety ? { ...figures.safety, cutId: figures.cutId, cutSeq: figures.cutSeq, cutAt: figures.cutAt } : null;
      const view = efficacyView(access, { sponsorSeesResponse: cohort.sponsorSeesResponse, released: releasedSafety !== null }, 'safety');
      return projectEfficacy(view, cohort, LIVE_SAFETY_KEYS, { released: releasedSafety });
    }),
  };
}
