import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useAfterEventWrite } from './use-after-event-write';
import { eventsPath } from './events-path';
import type { PatientEventsView } from './types';

export function useRemoveEvent(trialId: string, patientId: string) {
  const after = useAfterEventWrite(trialId);
  return useMutation({
    mutationFn: ({ eventId, version, reason }: { eventId: string; version: number; reason: string }) =>
      api<PatientEventsView>(`${eventsPath(trialId, patientId)}/${eventId}`, { method: 'DELETE', body: { version, reason } }),
    onSuccess: () => after(false),
  });
}
