/**
 * After an assessment changes: the answer carries the fresh derivation, so the panel takes it
 * directly. The derivation may change the patient's outcome or its disagreement flag (and writes
 * to the patient's history): the patient, the lists and Needs attention are stale, and where the
 * protocol derives outcomes, the figures counted over them too.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useInvalidate } from '../../lib/invalidate';
import { patientFigureKeys, patientKeys } from '../patients';
import { assessmentKeys } from './query-keys';
import type { AssessmentsView } from './types';

export function useAfterAssessmentWrite(trialId: string, patientId: string) {
  const queryClient = useQueryClient();
  const invalidate = useInvalidate();
  return (view: AssessmentsView) => {
    queryClient.setQueryData(assessmentKeys.patient(trialId, patientId), view);
    return invalidate(
      patientKeys.detail(trialId, patientId),
      patientKeys.lists(trialId),
      assessmentKeys.needsAttention(trialId),
      ...(view.outcomeSource === 'derived' ? patientFigureKeys(trialId) : []),
    );
  };
}
