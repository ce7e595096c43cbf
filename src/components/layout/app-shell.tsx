import { NavLink, Outlet, useLocation, useNavigation } from 'react-router';
import { useUser } from '@/features/me/api/get-me';
import { buttonClass, cx } from '@/components/ui';
import { Wordmark } from './wordmark';
import { UserMenu } from './user-menu';

const navClass = ({ isActive }: { isActive: boolean }) =>
  cx('rounded px-2 py-1.5 text-sm no-underline sm:px-3', isActive ? 'bg-paper-sunk font-medium text-ink' : 'text-ink-soft hover:text-ink');

export function AppShell() {
  const { user, teams, isPending } = useUser();
  const navigation = useNavigation();
  const location = useLocation();
  const next = location.pathname.startsWith('/sign-') ? '' : `?next=${encodeURIComponent(location.pathname + location.search)}`;
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50 focus:rounded focus:bg-paper-raised focus:px-3 focus:py-2">
        Skip to content
      </a>
      <header className="sticky top-0 z-10 border-b border-rule bg-paper/95 backdrop-blur print:hidden">
        <div className="mx-auto flex h-14 max-w-page items-center gap-1 px-4 sm:gap-4 sm:px-6">
          <NavLink to="/" className="mr-1 no-underline sm:mr-2" aria-label="Parallax, home">
            <Wordmark />
          </NavLink>
          <nav aria-label="Main" className="flex items-center gap-0.5 sm:gap-1">
            <NavLink to="/challenges" className={navClass}>Challenges</NavLink>
            <NavLink to="/teams" className={navClass}>Teams</NavLink>
          </nav>
          <div className="ml-auto flex items-center gap-2">
            {isPending ? (
              <span className="h-9 w-16" aria-hidden="true" />
            ) : user ? (
              <UserMenu user={user} teams={teams} />
            ) : (
              <>
                <NavLink to={`/sign-in${next}`} className={buttonClass('secondary', 'sm', 'sm:border-transparent sm:bg-transparent')}>Sign in</NavLink>
                <span className="hidden sm:contents">
                  <NavLink to="/sign-up" className={buttonClass('primary', 'sm')}>Sign up</NavLink>
                </span>
              </>
            )}
          </div>
        </div>
        <div aria-hidden="true" className={cx('h-0.5 origin-left bg-ink transition-transform duration-300', navigation.state === 'loading' ? 'scale-x-75' : 'scale-x-0')} />
      </header>
      <main id="main" className="mx-auto w-full max-w-page flex-1 px-4 py-6 sm:px-6 sm:py-10">
        <Outlet />
      </main>
      <footer className="border-t border-rule print:hidden">
        <div className="mx-auto flex max-w-page flex-wrap items-center justify-between gap-2 px-4 py-4 text-xs text-ink-soft sm:px-6">
          <span>Parallax — one quantity, two viewpoints.</span>
          <span className="flex items-center gap-3">
            <NavLink to="/api-reference" className="text-ink-soft">API reference</NavLink>
            <Legend />
          </span>
        </div>
      </footer>
    </div>
  );
}

function Legend() {
  return (
    <span className="flex flex-wrap items-center gap-x-3 gap-y-1">
      <span className="inline-flex items-center gap-1"><svg width="10" height="10" viewBox="0 0 12 12" aria-hidden="true"><path d="M6 .8 11.2 6 6 11.2.8 6Z" className="fill-hardware" /></svg>hardware</span>
      <span className="inline-flex items-center gap-1"><svg width="10" height="10" viewBox="0 0 12 12" aria-hidden="true"><circle cx="6" cy="6" r="4.4" fill="none" strokeWidth="1.9" className="stroke-classical" /></svg>classical</span>
      <span className="inline-flex items-center gap-1"><span className="inline-block h-0.5 w-3 bg-exact" aria-hidden="true" />exact</span>
      <span className="inline-flex items-center gap-1"><span className="inline-block h-2 w-3 rounded-sm bg-consensus-soft ring-1 ring-consensus/30" aria-hidden="true" />consensus</span>
    </span>
  );
}
