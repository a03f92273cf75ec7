import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useAfterEventWrite } from './use-after-event-write';
import { eventsPath } from './events-path';
import type { EventWrite } from './types';

export function useCorrectEvent(trialId: string, patientId: string) {
  const after = useAfterEventWrite(trialId);
  return useMutation({
    mutationFn: ({ eventId, body }: { eventId: string; body: Record<string, unknown> }) =>
      api<EventWrite & { attestationCleared: boolean }>(`${eventsPath(trialId, patientId)}/${eventId}`, { method: 'PATCH', body }),
    onSuccess: (written) => after(written.safety.paused),
  });
}
