/**
 * Renders a component as the app would (a fresh query client without retries, a memory router)
 * and answers `fetch` with canned JSON, so tests stop at the network boundary and need no server.
 */
import type { ReactElement, ReactNode } from 'react';
import { render, renderHook } from '@testing-library/react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router-dom';
import { vi } from 'vitest';

const testQueryClient = () => new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });

export function renderWithApp(ui: ReactElement, { path = '/' }: { path?: string } = {}) {
  const queryClient = testQueryClient();
  return render(
    <QueryClientProvider client={queryClient}>
      <MemoryRouter initialEntries={[path]}>{ui}</MemoryRouter>
    </QueryClientProvider>,
  );
}

/** Runs a hook (a mutation, say) the same way, and hands back the query client so the test can read its cache. */
export function renderHookWithApp<T>(hook: () => T) {
  const queryClient = testQueryClient();
  const wrapper = ({ children }: { children: ReactNode }) => (
    <QueryClientProvider client={queryClient}>
      <MemoryRouter>{children}</MemoryRouter>
    </QueryClientProvider>
  );
  return { ...renderHook(hook, { wrapper }), queryClient };
}

export type CannedResponse = { status: number; body?: unknown };

/** Replaces `fetch` with one that answers each call with the next canned response, in order. */
export function stubFetch(...responses: CannedResponse[]) {
  const queue = [...responses];
  const fetchMock = vi.fn((_input: RequestInfo | URL, _init?: RequestInit) => {
    const next = queue.shift();
    if (!next) return Promise.reject(new Error('An unexpected request reached the network.'));
    return Promise.resolve(new Response(next.body === undefined ? null : JSON.stringify(next.body), {
      status: next.status,
      headers: next.body === undefined ? {} : { 'content-type': 'application/json' },
    }));
  });
  vi.stubGlobal('fetch', fetchMock);
  return fetchMock;
}

/** The JSON body the app sent with a stubbed call. */
export function sentBody(fetchMock: ReturnType<typeof stubFetch>, call = 0): unknown {
  const init = fetchMock.mock.calls[call]?.[1];
  return typeof init?.body === 'string' ? JSON.parse(init.body) : undefined;
}
