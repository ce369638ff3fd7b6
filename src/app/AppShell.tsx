import { Suspense } from 'react';
import { NavLink, Outlet } from 'react-router';
import { roleAllows } from '@shared/roles';
import { useRole } from '../lib/permissions';
import { AccountMenu } from './AccountMenu';
import { navigation } from './navigation';
import { TeamSwitcher } from './TeamSwitcher';
import { Loading } from '../ui/States';

export function AppShell() {
  const role = useRole();
  const items = navigation.filter((item) => role !== null && roleAllows(role, item.permission));

  return (
    <div className="min-h-screen bg-paper text-ink">
      <header className="border-b border-rule">
        {/* on a phone: brand, team and account on the first line, the navigation a scrolling line below */}
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-4 gap-y-2 sm:gap-x-8 px-4 pt-3 sm:px-6 lg:flex-nowrap lg:pb-3">
          <NavLink to="/" className="text-base font-semibold tracking-[0.2em] uppercase">
            Tacet
          </NavLink>
          <div className="min-w-0 flex-1 lg:flex-none">
            <TeamSwitcher />
          </div>
          <nav aria-label="Main" className="order-last -mx-4 flex w-[calc(100%+2rem)] items-center gap-6 overflow-x-auto px-4 pb-3 whitespace-nowrap sm:-mx-6 sm:w-[calc(100%+3rem)] sm:px-6 lg:order-none lg:mx-0 lg:w-auto lg:flex-1 lg:overflow-visible lg:px-0 lg:pb-0">
            {items.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                title={item.description}
                className={({ isActive }) =>
                  `-mb-[0.8125rem] border-b-2 pb-3 text-sm ${
                    isActive ? 'border-accent text-ink' : 'border-transparent text-ink-soft hover:text-ink'
                  }`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="shrink-0">
            <AccountMenu />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 pt-8 pb-20 sm:px-6 sm:pt-10">
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
