/** The signed-in frame: the brand, navigation for this user's roles, who is signed in, sign-out. */
import { NavLink, Outlet } from 'react-router-dom';
import { Suspense } from 'react';
import { Loading } from '../components/ui';
import { hasAnyRole } from '../lib/roles';
import { allRoles, SignInPage, useMe, useSignOut } from '../features/auth';
import { globalNav } from './features';
import { ErrorBoundary } from './error-boundary';

export function Shell() {
  const { data: me, isPending } = useMe();
  const signOut = useSignOut();
  if (isPending) return <Loading label="Checking your sign-in" />;
  if (!me) return <SignInPage />;
  const roles = allRoles(me);
  const items = globalNav.filter((item) => (!item.roles || hasAnyRole(roles, item.roles)) && (!item.devOnly || me.environment.outbox));
  return (
    <div className="min-h-screen">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:bg-white focus:p-2">
        Skip to content
      </a>
      <header className="bg-ink-900 text-ink-50">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-6 px-6 py-3">
          <NavLink to="/" className="flex items-center gap-2 text-sm font-bold tracking-[0.25em] text-white uppercase">
            <svg aria-hidden viewBox="0 0 32 32" className="h-6 w-6">
              <circle cx="16" cy="16" r="4" fill="#b08d3c" />
              <circle cx="16" cy="16" r="11" fill="none" stroke="#b08d3c" strokeWidth="1.5" />
              <circle cx="27" cy="16" r="2.4" fill="#f6f4ee" />
            </svg>
            Orrery
          </NavLink>
          <nav aria-label="Main" className="flex flex-1 gap-1">
            {items.map((item) => (
              <NavLink
                key={item.path}
                to={item.path}
                end={item.path === '/'}
                className={({ isActive }) =>
                  `rounded-sm px-3 py-1.5 text-sm ${isActive ? 'bg-ink-700 text-white' : 'text-ink-200 hover:bg-ink-800 hover:text-white'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <span className="text-ink-200" title={me.user.email}>
              {me.user.name ?? me.user.email}
            </span>
            <button
              type="button"
              onClick={() => signOut.mutate()}
              disabled={signOut.isPending}
              className="rounded-sm border border-ink-500 px-2.5 py-1 text-ink-50 hover:border-brass-400"
            >
              {signOut.isPending ? 'Signing out…' : 'Sign out'}
            </button>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-7xl px-6 py-6">
        <ErrorBoundary>
          <Suspense fallback={<Loading />}>
            <Outlet />
          </Suspense>
        </ErrorBoundary>
      </main>
    </div>
  );
}
