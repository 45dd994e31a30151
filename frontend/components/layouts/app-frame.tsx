import { useEffect, useId, useMemo, useState } from 'react';
import { Navigate, NavLink, Outlet, useLocation, useNavigation } from 'react-router-dom';
import { Brand } from '@/components/brand';
import { Button } from '@/components/ui/button';
import { NoticeOutlet, NoticeProvider } from '@/components/ui/notice';
import { accountNav, mainNav, visibleNav, type NavEntry } from '@/config/nav';
import { loginHref, paths } from '@/config/paths';
import { useAppAbility } from '@/lib/ability';
import { useLogout, useSessionUser } from '@/lib/auth';
import { useDevMailboxAvailable } from '@/lib/dev-mailbox';
import { cn } from '@/utils/cn';

const navLinkClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    'flex min-h-11 items-center rounded-md px-3 text-sm font-medium no-underline hover:no-underline lg:min-h-8 pointer-coarse:min-h-11',
    isActive ? 'bg-surface text-ink shadow-[inset_3px_0_0] shadow-copper' : 'text-ink-muted hover:bg-ground-deep hover:text-ink',
  );

const NavList = ({ entries, nested = false }: { entries: NavEntry[]; nested?: boolean }) => (
  <ul className={cn('flex flex-col gap-0.5', nested && 'mt-0.5 ml-3 border-l border-line pl-2')}>
    {entries.map((entry) => (
      <li key={entry.key}>
        <NavLink to={entry.to} end={entry.end ?? false} className={navLinkClass}>
          {entry.label}
        </NavLink>
        {entry.children?.length ? <NavList entries={entry.children} nested /> : null}
      </li>
    ))}
  </ul>
);

/** Signed-in shell: brand, who you are, sign-out, and the navigation your roles allow. */
export const AppFrame = () => {
  const user = useSessionUser();
  const ability = useAppAbility();
  const location = useLocation();
  const navigation = useNavigation();
  const logout = useLogout();
  const mailboxAvailable = useDevMailboxAvailable();
  const [menuOpen, setMenuOpen] = useState(false);
  const [signingOut, setSigningOut] = useState(false);
  const menuId = useId();

  const hidden = useMemo(() => new Set(mailboxAvailable ? [] : ['outbox']), [mailboxAvailable]);
  const main = useMemo(() => visibleNav(mainNav, ability, hidden), [ability, hidden]);
  const account = useMemo(() => visibleNav(accountNav, ability), [ability]);

  // A phone's menu closes once you have picked somewhere to go.
  useEffect(() => setMenuOpen(false), [location.pathname]);
  useEffect(() => {
    if (!menuOpen) return;
    const closeOnEscape = (event: KeyboardEvent) => event.key === 'Escape' && setMenuOpen(false);
    window.addEventListener('keydown', closeOnEscape);
    return () => window.removeEventListener('keydown', closeOnEscape);
  }, [menuOpen]);

  if (!user) {
    // Signed out here or the session expired (a 401 anywhere clears the user).
    if (signingOut) return <Navigate to={paths.login} replace />;
    return <Navigate to={loginHref(`${location.pathname}${location.search}`)} replace />;
  }

  const signOut = () => {
    setSigningOut(true);
    logout.mutate();
  };

  return (
    <div className="flex min-h-dvh flex-col">
      <a href="#main" className="sr-only z-50 rounded-md bg-surface px-3 py-2 focus:not-sr-only focus:fixed focus:top-2 focus:left-2">
        Skip to content
      </a>
      <div
        className={cn(
          'fixed inset-x-0 top-0 z-40 h-0.5 origin-left bg-copper transition-transform duration-300',
          navigation.state === 'idle' ? 'scale-x-0' : 'scale-x-75 animate-pulse',
        )}
        aria-hidden="true"
      />
      <header className="sticky top-0 z-30 border-b border-line bg-ground/95 backdrop-blur">
        <div className="flex h-14 items-center gap-3 px-3 lg:px-5">
          <Button variant="ghost" className="lg:hidden" aria-expanded={menuOpen} aria-controls={menuId} onClick={() => setMenuOpen((open) => !open)}>
            <svg viewBox="0 0 16 16" className="size-4" aria-hidden="true">
              {menuOpen ? (
                <path d="M4 4l8 8M12 4l-8 8" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
              ) : (
                <path d="M2.5 4h11M2.5 8h11M2.5 12h11" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
              )}
            </svg>
            Menu
          </Button>
          <NavLink to={paths.today} className="min-w-0 no-underline hover:no-underline">
            <Brand />
            <span className="sr-only">, Today</span>
          </NavLink>
          <div className="ml-auto flex items-center gap-1">
            <NavLink
              to={paths.profile}
              className="hidden max-w-56 truncate rounded-md px-2 py-1 text-sm font-medium text-ink no-underline hover:bg-ground-deep hover:no-underline sm:block"
              title="Your profile"
            >
              {user.name}
            </NavLink>
            <Button variant="secondary" size="sm" onClick={signOut} pending={logout.isPending}>
              Sign out
            </Button>
          </div>
        </div>
      </header>

      <div className="flex flex-1">
        <nav
          id={menuId}
          aria-label="Main"
          className={cn(
            'border-line lg:sticky lg:top-14 lg:block lg:h-[calc(100dvh-3.5rem)] lg:w-52 lg:shrink-0 lg:overflow-y-auto lg:border-r lg:bg-ground-deep/60',
            menuOpen ? 'fixed inset-x-0 top-14 bottom-0 z-20 block overflow-y-auto border-t bg-ground lg:static lg:border-t-0' : 'hidden',
          )}
        >
          <div className="flex flex-col gap-4 p-3">
            <NavList entries={main} />
            <div className="border-t border-line pt-3">
              <p className="px-3 pb-1 text-xs text-ink-muted sm:hidden">Signed in as {user.name}</p>
              <NavList entries={account} />
            </div>
          </div>
        </nav>

        <main id="main" tabIndex={-1} className="min-w-0 flex-1 px-3 py-5 focus:outline-none lg:px-8 lg:py-6">
          <NoticeProvider>
            <NoticeOutlet />
            <Outlet />
          </NoticeProvider>
        </main>
      </div>
    </div>
  );
};
