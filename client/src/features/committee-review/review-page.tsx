/**
 * Committee review of one data cut: what was frozen, who has signed and what, the recommendation
 * form for committee members, the decision panel for the statistician, then the full analysis with
 * its cautions and the open data issues at the cut.
 */
import { Link, useParams } from 'react-router-dom';
import { Cautions, ErrorNotice, Glyphed, Loading, PageHeader, Panel } from '../../components/ui';
import { dateTime } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { CUT_KIND_LABELS, DECISION_WORDS, GLYPHS, RECOMMENDATION_WORDS, STOP_CATEGORY_LABELS } from '../../../../server/words';
import { useMe } from '../auth';
import { useTrialContext } from '../trials';
import { AnalysisView, CutHeader, Downloads, useAnalysis, useDataCut } from '../data-cuts';
import { useRecommendations } from './get-recommendations';
import { RecommendationForm } from './recommendation-form';
import { DecisionPanel } from './decision-panel';

const stopCategoryLabel = (category: string) => STOP_CATEGORY_LABELS[category as keyof typeof STOP_CATEGORY_LABELS] ?? STOP_CATEGORY_LABELS.other;

export function ReviewPage() {
  const trial = useTrialContext();
  const { cutId = '' } = useParams();
  const { data: me } = useMe();
  const detail = useDataCut(cutId);
  const signed = useRecommendations(cutId);
  const analysis = useAnalysis(cutId);
  if (detail.isPending || signed.isPending) return <Loading label="Loading the committee review" />;
  if (detail.error || signed.error) return <ErrorNotice error={detail.error ?? signed.error} title="This review could not be opened" />;
  const cut = detail.data.dataCut;
  const { recommendations, committeeSize } = signed.data;
  const mine = recommendations.find((r) => r.memberUserId === me?.user.id);
  const isMonitor = hasAnyRole(trial.myRoles, ['monitor']);
  const isStatistician = hasAnyRole(trial.myRoles, ['statistician']);
  const cohorts = cut.snapshot.cohorts.map((c) => c.code).join(', ');
  return (
    <div className="grid gap-4">
      <PageHeader
        title={`Committee review · data cut ${cut.seq}`}
        subtitle={`${trial.code} cohort ${cohorts} · ${CUT_KIND_LABELS[cut.kind].toLowerCase()}`}
        actions={
          <Link to=".." relative="path" className="rounded-sm border border-ink-300 px-3 py-1.5 text-sm font-semibold text-ink-900 hover:border-ink-500">
            Analysis of the cut
          </Link>
        }
      />
      <CutHeader cut={cut} analysis={analysis.data} />
      <Panel
        title="Recommendations"
        actions={
          <span role="status" className="text-sm font-semibold text-ink-900 tabular-nums">
            <span aria-hidden>{GLYPHS.done} </span>
            {recommendations.length} of {committeeSize} committee {committeeSize === 1 ? 'member has' : 'members have'} signed
          </span>
        }
      >
        {recommendations.length === 0 ? (
          <p className="text-sm text-ink-500">No recommendation signed yet.</p>
        ) : (
          <ul className="divide-y divide-ink-100">
            {recommendations.map((r) => (
              <li key={r.id} className="py-2 text-sm">
                <p className="font-semibold">
                  <Glyphed word={RECOMMENDATION_WORDS[r.decision]} /> — {r.memberName ?? r.memberEmail}
                </p>
                <p className="text-ink-700">{r.rationale}</p>
                <p className="text-xs text-ink-500">
                  Signed by {r.signature.signerName ?? r.signature.signerEmail} on {dateTime(r.signature.signedAt)}, password entered at {dateTime(r.signature.authenticatedAt)},
                  on analysis version {r.analysisVersion}
                  {r.analysisVersion !== cut.version ? ` (the analysis is now at version ${cut.version})` : ''} · “{r.signature.meaning}”
                </p>
              </li>
            ))}
          </ul>
        )}
      </Panel>
      {isMonitor && (
        <Panel title="Your recommendation">
          {mine ? (
            <p className="text-sm">
              <span aria-hidden>{GLYPHS.done} </span>You signed “{RECOMMENDATION_WORDS[mine.decision].label}” on {dateTime(mine.signature.signedAt)}. A member signs once per data cut.
            </p>
          ) : (
            <RecommendationForm cut={cut} trialId={trial.id} />
          )}
        </Panel>
      )}
      {(isStatistician || detail.data.decisions.length > 0) && (
        <Panel title="Decision">
          {detail.data.decisions.length > 0 && (
            <ul className="mb-3 space-y-1 text-sm">
              {detail.data.decisions.map((d) => (
                <li key={d.id}>
                  <strong>
                    Cohort {d.cohortCode}: <Glyphed word={DECISION_WORDS[d.action]} />
                  </strong>
                  {d.stopCategory ? ` (${stopCategoryLabel(d.stopCategory)})` : ''} — applied {dateTime(d.appliedAt)} by {d.appliedByName ?? 'the statistician'}. {d.reason}
                </li>
              ))}
            </ul>
          )}
          {isStatistician && <DecisionPanel detail={detail.data} trialId={trial.id} />}
        </Panel>
      )}
      <Panel title="Report and exports">
        <Downloads cut={cut} />
      </Panel>
      {analysis.isPending ? (
        <Loading label="Computing the analysis" />
      ) : analysis.error ? (
        <ErrorNotice error={analysis.error} title="The analysis could not be computed" />
      ) : (
        <AnalysisView analysis={analysis.data} />
      )}
      <Cautions />
    </div>
  );
}
