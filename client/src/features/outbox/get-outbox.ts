import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { outboxKeys } from './query-keys';

export type ReceivedMail = { id: number; to: string[]; from: string; subject: string; text: string; receivedAt: string };
export type QueuedMail = { id: number; kind: string; to: string; subject: string; attempts: number; lastError: string | null; nextAttemptAt: string };
export type Outbox = { received: ReceivedMail[]; queued: QueuedMail[]; catcher: string };

export const outboxQueryOptions = () =>
  queryOptions({ queryKey: outboxKeys.all(), queryFn: () => api<Outbox>('/api/dev/outbox'), refetchInterval: 5000 });

export const useOutbox = () => useQuery(outboxQueryOptions());
