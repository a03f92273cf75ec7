/** Catches a page's rendering failure so the rest of the app keeps working. */
import { Component, type ReactNode } from 'react';
import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';

type State = { error: Error | null };

export class ErrorBoundary extends Component<{ children: ReactNode }, State> {
  state: State = { error: null };

  static getDerivedStateFromError(error: Error): State {
    return { error };
  }

  render() {
    if (!this.state.error) return this.props.children;
    return <Failure message={this.state.error.message} onRetry={() => this.setState({ error: null })} />;
  }
}

function Failure({ message, onRetry }: { message: string; onRetry?: () => void }) {
  return (
    <div role="alert" className="mx-auto max-w-xl border-l-4 border-alert-600 bg-white p-6">
      <h1 className="text-lg font-semibold text-ink-950">This page failed to show</h1>
      <p className="mt-2 text-sm text-ink-600">{message}</p>
      <div className="mt-4 flex gap-4 text-sm">
        {onRetry && (
          <button type="button" className="font-semibold underline" onClick={onRetry}>
            Try again
          </button>
        )}
        <Link to="/" className="underline">
          Back to the portfolio
        </Link>
      </div>
    </div>
  );
}

export function RouteErrorPage() {
  const error = useRouteError();
  const message = isRouteErrorResponse(error) ? `${error.status} ${error.statusText}` : error instanceof Error ? error.message : 'Unknown error';
  return (
    <main className="p-6">
      <Failure message={message} />
    </main>
  );
}
