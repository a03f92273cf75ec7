import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useAfterEventWrite } from './use-after-event-write';
import { eventsPath } from './events-path';
import type { EventWrite } from './types';

export function useAddEvent(trialId: string, patientId: string) {
  const after = useAfterEventWrite(trialId);
  return useMutation({
    mutationFn: (body: Record<string, unknown>) => api<EventWrite>(eventsPath(trialId, patientId), { method: 'POST', body }),
    onSuccess: (written) => after(written.safety.paused),
  });
}
