import type { ReactNode } from 'react';
import { Link, useLocation, useNavigation } from 'react-router-dom';
import { Logo } from '@/components/ui/logo';
import { Spinner } from '@/components/ui/spinner';
import { AdminIcon, AuditIcon, ProjectsIcon, SettingsIcon, SignOutIcon } from '@/components/ui/icons';
import { paths } from '@/config/paths';

interface AppShellProps {
  userName: string;
  userEmail: string;
  isAdmin: boolean;
  signingOut: boolean;
  onSignOut: () => void;
  /** Shown beside the logo, e.g. the notification bell. */
  headerExtra?: ReactNode;
  children: ReactNode;
}

const navItems = [
  {
    to: paths.home.getHref(),
    label: 'Projects',
    icon: ProjectsIcon,
    adminOnly: false,
    match: (pathname: string) => pathname === '/' || pathname.startsWith('/projects/'),
  },
  {
    to: paths.settings.getHref(),
    label: 'Settings',
    icon: SettingsIcon,
    adminOnly: false,
    match: (pathname: string) => pathname.startsWith(paths.settings.path),
  },
  {
    to: paths.admin.getHref(),
    label: 'Admin',
    icon: AdminIcon,
    adminOnly: true,
    match: (pathname: string) => pathname === paths.admin.path,
  },
  {
    to: paths.audit.getHref(),
    label: 'Audit',
    icon: AuditIcon,
    adminOnly: true,
    match: (pathname: string) => pathname.startsWith(paths.audit.path),
  },
];

export function AppShell({ userName, userEmail, isAdmin, signingOut, onSignOut, headerExtra, children }: AppShellProps) {
  const navigation = useNavigation();
  const { pathname } = useLocation();
  const busy = navigation.state !== 'idle';
  const items = navItems.filter((item) => isAdmin || !item.adminOnly);

  return (
    <div className="min-h-dvh md:grid md:grid-cols-[15.5rem_minmax(0,1fr)] md:bg-[linear-gradient(to_right,var(--color-ink)_15.5rem,transparent_15.5rem)]">
      <a
        href="#main"
        className="sr-only z-50 rounded-full bg-ember px-4 py-2 font-bold text-ink focus:not-sr-only focus:fixed focus:top-3 focus:left-3"
      >
        Skip to content
      </a>
      <div
        aria-hidden="true"
        className={`fixed inset-x-0 top-0 z-40 h-0.5 overflow-hidden transition-opacity ${busy ? 'opacity-100' : 'opacity-0'}`}
      >
        <div className="h-full w-2/5 animate-progress bg-ember" />
      </div>

      <aside className="lattice flex flex-col bg-ink text-card md:sticky md:top-0 md:h-dvh [&_:focus-visible]:outline-ember-bright">
        <div className="flex items-center justify-between gap-3 px-5 pt-5 pb-3 md:pb-8">
          <Link to={paths.home.getHref()} className="rounded-lg" aria-label="Phasewright home">
            <Logo size={30} tone="paper" />
          </Link>
          {headerExtra}
        </div>

        <nav aria-label="Main" className="px-3">
          <ul className="flex gap-1 overflow-x-auto pb-3 md:flex-col md:pb-0">
            {items.map(({ to, label, icon: Icon, match }) => {
              const active = match(pathname);
              return (
                <li key={to}>
                  <Link
                    to={to}
                    aria-current={active ? 'page' : undefined}
                    className={`relative flex items-center gap-3 rounded-xl px-3 py-2.5 font-bold transition-colors ${
                      active ? 'bg-card/12 text-card' : 'text-ink-mist hover:bg-card/6 hover:text-card'
                    }`}
                  >
                    <span
                      aria-hidden="true"
                      className={`absolute top-2 bottom-2 left-0 w-1 rounded-full bg-ember transition-opacity ${active ? 'opacity-100' : 'opacity-0'}`}
                    />
                    <Icon />
                    <span>{label}</span>
                  </Link>
                </li>
              );
            })}
          </ul>
        </nav>

        <div className="mt-auto hidden border-t border-card/10 p-4 md:block">
          <p className="truncate font-bold" title={userName}>
            {userName}
          </p>
          <p className="truncate text-sm text-ink-mist" title={userEmail}>
            {userEmail}
          </p>
          <button
            type="button"
            onClick={onSignOut}
            disabled={signingOut}
            className="mt-3 inline-flex items-center gap-2 rounded-full px-3 py-1.5 text-sm font-bold text-ink-mist ring-1 ring-card/20 hover:bg-card/10 hover:text-card disabled:opacity-60"
          >
            {signingOut ? <Spinner /> : <SignOutIcon className="size-4" />}
            Sign out
          </button>
        </div>
        <div className="flex items-center justify-between gap-3 border-t border-card/10 px-5 py-2 text-sm md:hidden">
          <span className="truncate text-ink-mist">{userName}</span>
          <button
            type="button"
            onClick={onSignOut}
            disabled={signingOut}
            className="rounded-full px-3 py-1 font-bold text-ink-mist ring-1 ring-card/20 hover:text-card"
          >
            Sign out
          </button>
        </div>
      </aside>

      <main id="main" tabIndex={-1} className="min-w-0 px-5 py-8 focus:outline-none md:px-10 md:py-10">
        <div className="mx-auto max-w-6xl">{children}</div>
      </main>
    </div>
  );
}
