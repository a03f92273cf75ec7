/** The safety records as the server sends them. */
import type { AdverseEvent } from '../../../../server/safety/adverse-events.repository';
import type { EventWrite, PatientEventsView } from '../../../../server/safety/adverse-events.service';
import type { EventImportReport, EventRowResult } from '../../../../server/safety/adverse-events-import';
import type { CohortSafety, VisibleCohortSafety } from '../../../../server/safety/safety.service';
import type { ToxicityDerivation } from '../../../../server/safety/toxicity';

export type { AdverseEvent, CohortSafety, VisibleCohortSafety, EventImportReport, EventRowResult, EventWrite, PatientEventsView, ToxicityDerivation };

export type TrialSafety = { trialId: string; confLevel: number; cautions: string[]; cohorts: VisibleCohortSafety[] };

export type EventFilters = { cohortId?: string; siteId?: string; q?: string; minGrade?: number; serious?: boolean; page: number; pageSize: number };
export type { SafetyAttentionItem, SafetyAttentionKind, SafetyAttentionSite } from '../../../../server/safety/attention';
