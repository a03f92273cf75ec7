/** The Outbox's query key: the development mailbox and the mail still queued. */
export const outboxKeys = {
  all: () => ['outbox'] as const,
};
