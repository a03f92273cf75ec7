import { useSearchParams } from 'react-router-dom';
import { signInUrl } from '../../lib/api';
import { signInErrorText } from '../../lib/sign-in-errors';
import { Cautions } from '../../components/ui';

export function SignInPage() {
  const [params] = useSearchParams();
  const error = signInErrorText(params.get('signInError'));
  const returnTo = window.location.pathname === '/sign-in' ? '/' : window.location.pathname + window.location.search;
  return (
    <main className="mx-auto flex min-h-screen max-w-xl flex-col justify-center gap-6 px-6">
      <div className="border-t-4 border-brass-500 bg-white p-8 shadow-sm">
        <p className="text-xs font-bold tracking-[0.2em] text-brass-600 uppercase">Orrery</p>
        <h1 className="mt-2 text-2xl font-semibold text-ink-950">Phase II trial evidence, kept current</h1>
        <p className="mt-3 text-sm text-ink-600">
          Designs, patients and outcomes, exact binomial evidence, stopping rules and signed committee recommendations for
          single-arm trials with a binary endpoint.
        </p>
        {error && (
          <p role="alert" className="mt-4 border-l-4 border-alert-600 bg-alert-50 px-3 py-2 text-sm text-alert-600">
            {error}
          </p>
        )}
        <a
          href={signInUrl(returnTo)}
          className="mt-6 inline-block rounded-sm bg-ink-900 px-4 py-2 text-sm font-semibold text-white hover:bg-ink-700"
        >
          Sign in with your organisation account
        </a>
      </div>
      <Cautions items={['Decision support only: stopping and continuation decisions belong to the trial statistician, the data monitoring committee and the ethics board, under the protocol and local regulations.']} />
    </main>
  );
}
