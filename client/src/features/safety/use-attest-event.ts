import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import { safetyKeys } from './query-keys';
import { eventsPath } from './events-path';
import type { AdverseEvent } from './types';

export function useAttestEvent(trialId: string, patientId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ eventId, version }: { eventId: string; version: number }) =>
      api<{ event: AdverseEvent }>(`${eventsPath(trialId, patientId)}/${eventId}/attestation`, { method: 'POST', body: { version } }),
    // An attestation counts in no figure: only the events show it.
    onSuccess: () => invalidate(safetyKeys.events(trialId)),
  });
}
