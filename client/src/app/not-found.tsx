import { Link } from 'react-router-dom';

export function NotFoundPage() {
  return (
    <div className="mx-auto max-w-xl py-16 text-center">
      <p className="font-mono text-sm text-brass-600">404</p>
      <h1 className="mt-2 text-2xl font-semibold text-ink-950">There is no page here</h1>
      <p className="mt-2 text-sm text-ink-600">The address may be mistyped, or the page belongs to a trial you are not a member of.</p>
      <Link to="/" className="mt-6 inline-block text-sm font-semibold underline">
        Back to the portfolio
      </Link>
    </div>
  );
}
